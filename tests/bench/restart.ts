// Restart time of `npm start`: the real command (npm, bootstrap, start.ts) on free ports with its
// own data folder, timed from the spawn until /healthz answers 200; then Ctrl-C (SIGINT to its
// process group) and again with the data kept. The first start may build and always creates and
// seeds the database; the second is the "restart with data kept" of the issue.
import { spawn } from "node:child_process";
import { randomBytes } from "node:crypto";
import { rmSync } from "node:fs";
import path from "node:path";
import { freePort, repoRoot } from "../../app/cli/services";

async function startOnce(env: Record<string, string>, url: string) {
  const t0 = performance.now();
  const child = spawn("npm", ["start", "--silent"], { cwd: repoRoot, env: { ...process.env, ...env }, detached: true, stdio: ["ignore", "pipe", "pipe"] });
  let out = "";
  child.stdout!.on("data", (d) => (out += d));
  child.stderr!.on("data", (d) => (out += d));
  const exited = new Promise<void>((r) => child.once("exit", () => r()));
  let ready = NaN;
  const until = Date.now() + 600_000;
  while (Date.now() < until && child.exitCode === null) {
    try {
      const res = await fetch(`${url}/healthz`, { signal: AbortSignal.timeout(2_000) });
      if (res.status === 200) {
        ready = performance.now() - t0;
        break;
      }
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 50));
  }
  process.kill(-child.pid!, "SIGINT"); // what Ctrl-C does: the whole foreground process group
  const killer = setTimeout(() => process.kill(-child.pid!, "SIGKILL"), 30_000);
  await exited;
  clearTimeout(killer);
  if (!Number.isFinite(ready)) throw new Error(`npm start did not become ready:\n${out.slice(-3000)}`);
  return {
    ms: ready,
    built: out.includes("[start] building the app"),
    services: out.match(/services ready \(([\d.]+ s)\)/)?.[1] ?? "?",
    serving: out.match(/\[start\] ready in ([\d.]+ s)/)?.[1] ?? "?",
  };
}

export async function runRestartBench(): Promise<string[]> {
  const dataDir = path.join(repoRoot, ".data", `bench-restart-${Date.now()}`);
  const [app, db, smtp, web, pay] = await Promise.all([freePort(), freePort(), freePort(), freePort(), freePort()]);
  const url = `http://127.0.0.1:${app}`;
  const env = {
    NIGHTSHARE_DATA_DIR: dataDir,
    PORT: String(app),
    APP_URL: url,
    DATABASE_PORT: String(db),
    SMTP_PORT: String(smtp),
    MAILDEV_WEB_PORT: String(web),
    STRIPE_API_PORT: String(pay),
    SESSION_SECRET: randomBytes(32).toString("hex"),
    TOTP_SECRET: randomBytes(32).toString("hex"),
  };
  const lines: string[] = [];
  try {
    const first = await startOnce(env, url);
    lines.push(`first start (new database, migrations and demo seed${first.built ? ", build" : ", build skipped"})  ${(first.ms / 1000).toFixed(1)} s   (services ready at ${first.services})`);
    const times: number[] = [];
    let last = first;
    for (let i = 0; i < 3; i++) {
      last = await startOnce(env, url);
      times.push(last.ms);
      lines.push(`  restart ${i + 1}: services ready at ${last.services}, app process started at ${last.serving}, /healthz 200 at ${(last.ms / 1000).toFixed(1)} s`);
    }
    const median = [...times].sort((a, b) => a - b)[1];
    lines.push(
      `restart with data kept, median of 3 (${times.map((t) => (t / 1000).toFixed(1)).join(", ")} s; ${last.built ? "rebuilt" : "build skipped"})  ${(median / 1000).toFixed(1)} s   goal ≤ 5 s  ${median <= 5000 ? "met" : `MISSED by ${((median - 5000) / 1000).toFixed(1)} s`}`,
    );
  } finally {
    rmSync(dataDir, { recursive: true, force: true });
  }
  return lines;
}
