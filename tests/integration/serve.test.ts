// `npm run serve` runs the build's bundle of serve.ts (app/cli/node-bundles.ts), here the test
// run's build (NIGHTSHARE_BUILD_DIR), with the environment each test gives and nothing else.
import { spawn, spawnSync } from "node:child_process";
import { cpSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { freePort } from "~/cli/services";
import { EXAMPLE_SECRETS } from "~/lib/env";
import { testEnv } from "../helpers/env";

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

const baseEnv = () => ({ PATH: process.env.PATH ?? "/usr/bin:/bin", HOME: process.env.HOME ?? "/root", NIGHTSHARE_BUILD_DIR: testEnv.buildDir });

/** Runs `npm run serve` with exactly this environment (plus PATH, HOME and the run's build). */
function serve(env: Record<string, string>): Promise<{ code: number | null; output: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn("npm", ["run", "--silent", "serve"], {
      cwd: root,
      env: { ...baseEnv(), ...env },
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

  it("serves without tsx: a long visibility run is computed by the bundled science worker", async () => {
    // A copy of the run's build, beside a node_modules/tsx of its own that fails on import: what
    // the build, or a worker thread it starts, would import of tsx resolves there first.
    const dir = mkdtempSync(path.join(root, ".data", "serve-no-tsx-"));
    try {
      const build = path.join(dir, "build");
      cpSync(testEnv.buildDir, build, { recursive: true });
      mkdirSync(path.join(dir, "node_modules/tsx"), { recursive: true });
      writeFileSync(path.join(dir, "node_modules/tsx/package.json"), JSON.stringify({ name: "tsx", type: "module", exports: { ".": "./gone.js", "./esm/api": "./gone.js" } }));
      writeFileSync(path.join(dir, "node_modules/tsx/gone.js"), `throw new Error("tsx is not installed here");\n`);
      // it does stop an import of tsx from the build's workers' folder, in a worker thread
      const probeFile = path.join(build, "server/workers/probe.mjs");
      writeFileSync(probeFile, `import "tsx/esm/api";\n`);
      const probe = spawnSync(process.execPath, ["-e", `new (require("node:worker_threads").Worker)(${JSON.stringify(probeFile)}).on("error", (e) => { console.error(e.message); process.exit(3); });`], { cwd: root, encoding: "utf8" });
      expect(probe.status).toBe(3);
      expect(probe.stderr).toContain("tsx is not installed here");
      rmSync(probeFile);
      // and the bundled science worker says when it starts (this copy only), so that an answer
      // computed in the server's own thread would not pass for one from the worker
      const workerFile = path.join(build, "server/workers/compute-worker.mjs");
      writeFileSync(workerFile, `${readFileSync(workerFile, "utf8")}\nprocess.stderr.write("[bundled science worker started]\\n");\n`);

      const port = await freePort();
      const child = spawn("npm", ["run", "--silent", "serve"], {
        cwd: root,
        env: { ...baseEnv(), ...production, NIGHTSHARE_BUILD_DIR: build, PORT: String(port) },
        stdio: ["ignore", "pipe", "pipe"],
        detached: true,
      });
      let output = "";
      child.stdout.on("data", (d) => (output += d));
      child.stderr.on("data", (d) => (output += d));
      const exited = new Promise((resolve) => child.once("exit", resolve));
      try {
        for (let i = 0; i < 200 && !output.includes("listening") && child.exitCode === null; i++) await new Promise((r) => setTimeout(r, 100));
        expect(output).toContain(`listening on http://127.0.0.1:${port}`);
        // more than HEAVY_VISIBILITY_NIGHTS (31) nights: the science pool's worker computes it
        const res = await fetch(`http://127.0.0.1:${port}/api/v1/visibility?lat=31.3&lon=-108.7&elevation=2100&timeZone=America/Denver&ra=05:36:48&dec=%2B18:30:00&from=2027-10-01&nights=40&minAltitude=30`);
        const body = (await res.json()) as { nights?: { date: string }[] };
        expect({ status: res.status, nights: body.nights?.length, first: body.nights?.[0]?.date }).toEqual({ status: 200, nights: 40, first: "2027-10-01" });
        await expect.poll(() => output).toContain("[bundled science worker started]");
        expect(output).not.toContain("science worker failed");
      } finally {
        if (child.exitCode === null) process.kill(-child.pid!, "SIGTERM");
        await exited;
      }
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 60_000);
});
