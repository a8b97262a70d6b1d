import { readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { EXAMPLE_SECRETS, exampleSecretsIn, parseEnv, parseProductionEnv } from "./env";

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

describe("production refuses the example secrets", () => {
  const exampleFile = Object.fromEntries(
    readFileSync(path.resolve(import.meta.dirname, "../../.env.example"), "utf8")
      .split("\n")
      .filter((line) => /^[A-Z_]+=/.test(line))
      .map((line) => [line.slice(0, line.indexOf("=")), line.slice(line.indexOf("=") + 1)]),
  );

  it("knows every secret of .env.example", () => {
    for (const [name, value] of Object.entries(EXAMPLE_SECRETS)) expect(exampleFile[name], name).toBe(value);
  });

  it.each(Object.keys(EXAMPLE_SECRETS))("refuses the example %s in production, naming it", (name) => {
    const source = { ...good, NODE_ENV: "production", [name]: exampleFile[name] };
    expect(() => parseProductionEnv(source)).toThrow(new RegExp(`example value of ${name}`));
  });

  it("accepts fresh secrets in production and the example ones in development", () => {
    expect(parseProductionEnv({ ...good, NODE_ENV: "production" }).NODE_ENV).toBe("production");
    expect(exampleSecretsIn({ ...good, ...exampleFile })).toEqual(Object.keys(EXAMPLE_SECRETS));
    expect(parseProductionEnv({ ...good, ...exampleFile, NODE_ENV: "development" }).NODE_ENV).toBe("development");
  });
});
