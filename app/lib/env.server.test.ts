import { describe, expect, it } from "vitest";
import { parseEnv } from "./env.server";

const good = {
  APP_URL: "http://127.0.0.1:3000",
  DATABASE_HOST: "127.0.0.1",
  DATABASE_PORT: "3407",
  DATABASE_NAME: "nightshare",
  DATABASE_USER: "nightshare",
  DATABASE_PASSWORD: "x",
  SESSION_SECRET: "s".repeat(32),
  TOTP_SECRET: "a".repeat(64),
  SMTP_HOST: "127.0.0.1",
  SMTP_PORT: "1025",
  MAIL_FROM: "Office <office@example.org>",
  STRIPE_SECRET_KEY: "sk_test_x",
  STRIPE_WEBHOOK_SECRET: "whsec_x",
};

describe("environment validation at start-up", () => {
  it("accepts the documented local values", () => {
    expect(parseEnv(good).DATABASE_PORT).toBe(3407);
  });

  it.each([
    ["SESSION_SECRET", undefined],
    ["SESSION_SECRET", "short"],
    ["TOTP_SECRET", "not-hex"],
    ["DATABASE_PORT", "eighty"],
    ["APP_URL", "localhost"],
    ["STRIPE_SECRET_KEY", "pk_live_wrong_kind"],
  ])("refuses to start when %s is %s, naming it", (name, value) => {
    expect(() => parseEnv({ ...good, [name]: value })).toThrow(new RegExp(`${name}:`));
  });
});
