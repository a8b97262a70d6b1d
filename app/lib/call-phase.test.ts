import { describe, expect, it } from "vitest";
import { callPhase, deadlinePassed } from "./call-phase";

describe("call phase", () => {
  const call = { opensAt: "2027-01-10T00:00:00.000Z", deadlineAt: "2027-03-01T12:00:00.000Z" };
  it("announced before the opening, open from it, closed from the deadline on", () => {
    expect(callPhase(call, "2027-01-09T23:59:59.999Z")).toBe("announced");
    expect(callPhase(call, "2027-01-10T00:00:00.000Z")).toBe("open");
    expect(callPhase(call, new Date("2027-03-01T11:59:59.999Z"))).toBe("open");
    expect(callPhase(call, "2027-03-01T12:00:00.000Z")).toBe("closed");
    expect(callPhase({ opensAt: new Date(call.opensAt), deadlineAt: new Date(call.deadlineAt) }, "2027-02-01T00:00:00.000Z")).toBe("open");
  });
  it("the deadline itself has passed", () => {
    expect(deadlinePassed(call, "2027-03-01T12:00:00.000Z")).toBe(true);
    expect(deadlinePassed(call, "2027-03-01T11:59:00.000Z")).toBe(false);
  });
});
