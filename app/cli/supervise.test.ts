// The supervisor of `npm start`: a child that stops on its own is started again after a growing
// back-off, the others keep running, and stop() ends it all. With the real mail catcher and with
// a dummy child that crashes.
import { spawn } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { childService, freePort, startMaildev, supervise, type Service } from "./services";

const until = async (check: () => boolean | Promise<boolean>, timeoutMs = 90_000) => {
  const end = Date.now() + timeoutMs;
  while (Date.now() < end) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error("timed out");
};
const alive = (pid: number | undefined) => {
  try {
    return pid !== undefined && process.kill(pid, 0);
  } catch {
    return false;
  }
};
// A child that lives until it is killed, or exits with code 3 after `crashAfterMs`.
const dummy = (crashAfterMs?: number) => async (): Promise<Service> =>
  childService("dummy", spawn(process.execPath, ["-e", crashAfterMs ? `setTimeout(() => process.exit(3), ${crashAfterMs})` : "setInterval(() => {}, 1000)"], { stdio: "ignore" }));

const logDir = mkdtempSync(path.join(tmpdir(), "nightshare-supervise-"));
afterAll(() => rmSync(logDir, { recursive: true, force: true }));

describe("supervise", () => {
  it("starts a killed mail catcher again and it answers again; a neighbour keeps running", { timeout: 180_000 }, async () => {
    const [smtpPort, webPort] = [await freePort(), await freePort()];
    const lines: string[] = [];
    const maildev = await supervise("the mail catcher", () => startMaildev({ smtpPort, webPort, logDir }), { log: (l) => lines.push(l), minDelayMs: 200 });
    const neighbour = await supervise("neighbour", dummy(), { log: (l) => lines.push(l), minDelayMs: 200 });
    try {
      const first = maildev.child.pid;
      const neighbourPid = neighbour.child.pid;
      maildev.child.kill("SIGKILL");
      await until(() => maildev.restarts === 1);
      expect(maildev.child.pid).not.toBe(first);
      expect(alive(first)).toBe(false);
      const res = await fetch(`http://127.0.0.1:${webPort}/api/healthz`);
      expect(res.status).toBe(200);
      expect(lines[0]).toBe("[supervisor] the mail catcher stopped (signal SIGKILL); starting it again in 0.2 s");
      expect(lines[1]).toMatch(/^\[supervisor\] the mail catcher is running again \(restart 1, pid \d+\)$/);
      expect(neighbour.child.pid).toBe(neighbourPid);
      expect(neighbour.restarts).toBe(0);
      expect(alive(neighbourPid)).toBe(true);
    } finally {
      await maildev.stop();
      await neighbour.stop();
    }
    expect(alive(maildev.child.pid)).toBe(false);
    expect(alive(neighbour.child.pid)).toBe(false);
  });

  it("backs off 1×, 2×, 4× … up to the cap, and stop() ends the restarts", async () => {
    const lines: string[] = [];
    const crashing = await supervise("crasher", dummy(30), { log: (l) => lines.push(l), minDelayMs: 50, maxDelayMs: 200 });
    await until(() => crashing.restarts >= 4);
    await crashing.stop();
    const waits = lines.filter((l) => l.startsWith("[supervisor] crasher stopped")).map((l) => l.match(/again in ([\d.]+) s$/)?.[1]);
    expect(lines[0]).toBe("[supervisor] crasher stopped (exit 3); starting it again in 0.05 s");
    expect(waits.slice(0, 4)).toEqual(["0.05", "0.1", "0.2", "0.2"]);
    const restarts = crashing.restarts;
    await new Promise((r) => setTimeout(r, 400));
    expect(crashing.restarts).toBe(restarts);
    expect(alive(crashing.child.pid)).toBe(false);
  });

  it("does not retry a service that cannot start at all: the caller hears why", async () => {
    await expect(supervise("broken", () => Promise.reject(new Error("no such binary")), { log: () => undefined })).rejects.toThrow("no such binary");
  });
});
