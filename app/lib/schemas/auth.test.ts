import { describe, expect, it } from "vitest";
import { CODE_ALPHABET, codeSchema } from "./auth";

describe("sign-in codes", () => {
  it("use an alphabet without look-alike characters", () => {
    for (const lookAlike of ["0", "O", "o", "1", "I", "i", "l", "L"]) expect(CODE_ALPHABET, lookAlike).not.toContain(lookAlike);
    expect(new Set(CODE_ALPHABET).size).toBe(CODE_ALPHABET.length);
    expect(CODE_ALPHABET.length).toBeGreaterThanOrEqual(30);
  });

  it.each([
    ["k7mq2x", "K7MQ2X"],
    [" K7mQ2x ", "K7MQ2X"],
    ["k7m-q2x", "K7MQ2X"],
    ["k7m q2x", "K7MQ2X"],
  ])("accepts %j in any case as %s", (typed, expected) => {
    const parsed = codeSchema.safeParse({ code: typed });
    expect(parsed.success).toBe(true);
    expect(parsed.data?.code).toBe(expected);
  });

  it.each(["", "k7mq2", "k7mq2xy", "k7m!2x"])("refuses %j with a message", (typed) => {
    const parsed = codeSchema.safeParse({ code: typed });
    expect(parsed.success).toBe(false);
    expect(parsed.error?.issues[0].message).toMatch(/code/);
  });
});
