import { spawn } from "node:child_process";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { EXAMPLE_SECRETS } from "~/lib/env";

const root = path.resolve(import.meta.dirname, "../..");

/** Values that pass validation and are not the examples (a stand-in production environment). */
const production: Record<string, string> = {
  NODE_ENV: "production",
  APP_URL: "https://nightshare.test",
  HOST: "127.0.0.1",
  PORT: "1",
  DATABASE_HOST: "127.0.0.1",
  DATABASE_PORT: "1",
  DATABASE_NAME: "nightshare",
  DATABASE_USER: "nightshare",
  DATABASE_PASSWORD: "a-production-password",
  SESSION_SECRET: "f3b9c2e7a1d84f6b9e0c5a7d2b8f4e1c6a9d3b7e",
  TOTP_SECRET: "9d2e4f6a8b0c1d3e5f7a9b1c3d5e7f9a0b2c4d6e8f0a1b3c5d7e9f1a3b5c7d9e",
  SMTP_HOST: "127.0.0.1",
  SMTP_PORT: "1",
  MAIL_FROM: "Nightshare <office@nightshare.test>",
  STRIPE_SECRET_KEY: "sk_live_not_the_example_9f8e7d6c",
  STRIPE_WEBHOOK_SECRET: "whsec_not_the_example_1a2b3c4d",
};

/** Runs `npm run serve` with exactly this environment (plus PATH and HOME). */
function serve(env: Record<string, string>): Promise<{ code: number | null; output: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn("npm", ["run", "--silent", "serve"], {
      cwd: root,
      env: { PATH: process.env.PATH ?? "/usr/bin:/bin", HOME: process.env.HOME ?? "/root", ...env },
      stdio: ["ignore", "pipe", "pipe"],
    });
    let output = "";
    child.stdout.on("data", (d) => (output += d));
    child.stderr.on("data", (d) => (output += d));
    const timer = setTimeout(() => child.kill("SIGKILL"), 25_000);
    child.on("error", reject);
    child.on("exit", (code) => {
      clearTimeout(timer);
      resolve({ code, output });
    });
  });
}

describe("npm run serve (the production entry)", () => {
  it.each(Object.keys(EXAMPLE_SECRETS) as (keyof typeof EXAMPLE_SECRETS)[])(
    "refuses the example value of %s from .env.example, naming it",
    async (name) => {
      const { code, output } = await serve({ ...production, [name]: EXAMPLE_SECRETS[name] });
      expect(code).not.toBe(0);
      expect(output).toContain(`example value of ${name}`);
      expect(output).not.toContain("listening");
    },
  );

  it("never loads .env.example: a missing secret is named, not filled from the example file", async () => {
    const { SESSION_SECRET: _, ...withoutSecret } = production;
    const { code, output } = await serve(withoutSecret);
    expect(code).not.toBe(0);
    expect(output).toMatch(/SESSION_SECRET: /);
  });

  it("refuses to run as anything but production", async () => {
    const { code, output } = await serve({ ...production, NODE_ENV: "development" });
    expect(code).not.toBe(0);
    expect(output).toContain("production entry");
  });
});
