// The built app behind our HTTP front (the same stack as `npm start`), in this process, on the
// bench's private MariaDB with the demo seeded (tests/bench/services.ts). It uses `npm start`'s
// build folder, building it first when a source file is newer (the same stamp as `npm start`).
// SQL statements are counted through a `beforeQuery` hook on every Sequelize instance (the
// build has its own): `statementsOf(fn)` gives the number run while `fn` ran.
import { spawnSync } from "node:child_process";
import type { Server } from "node:http";
import type { AddressInfo } from "node:net";
import path from "node:path";
import type { ServerBuild } from "react-router";
import { Sequelize } from "sequelize";
import { buildIsFresh, sourceState, writeBuildStamp } from "../../app/cli/build-stamp";
import { repoRoot } from "../../app/cli/services";
import { benchServices } from "./services";

let counting = 0;
let statements = 0;
let hooked = false;

export function ensureBuild(): string {
  if (!buildIsFresh()) {
    console.log("  (building the app: a source file is newer than build/)");
    const before = sourceState();
    const r = spawnSync(path.join(repoRoot, "node_modules/.bin/react-router"), ["build"], { cwd: repoRoot, stdio: "ignore", env: { ...process.env, NODE_ENV: "production" } });
    if (r.status !== 0) throw new Error("react-router build failed");
    writeBuildStamp(before);
  }
  return path.join(repoRoot, "build");
}

/** `env`: set after the services' environment, before the build is loaded (it reads some at load). */
export async function benchApp({ env = {} }: { env?: Record<string, string> } = {}) {
  if (!hooked) {
    hooked = true;
    // before any instance exists: the bench's own models and the build's
    Sequelize.addHook("afterInit", (instance) => {
      instance.addHook("beforeQuery", () => {
        if (counting > 0) statements++;
      });
    });
  }
  const buildDir = ensureBuild();
  // as `npm start` serves it (React's production build is chosen when React is first loaded)
  const services = await benchServices({ nodeEnv: "production" });
  // the mail and reminder workers' statements would be counted with the requests'
  process.env.MAIL_WORKER = "off";
  Object.assign(process.env, env);
  const { createHttpApp } = await import("../../app/cli/http-app");
  const build = (await import(path.join(buildDir, "server/index.js"))) as ServerBuild;
  const app = createHttpApp({ build, clientDir: path.join(buildDir, "client") });
  const server: Server = await new Promise((resolve) => {
    const s = app.listen(0, "127.0.0.1", () => resolve(s));
  });
  server.keepAliveTimeout = 30_000;
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const { sessionCookieFor } = await import("../helpers/session");
  return {
    url,
    sequelize: services.sequelize,
    cookieFor: sessionCookieFor,
    async statementsOf<T>(fn: () => Promise<T>): Promise<{ result: T; statements: number }> {
      const before = statements;
      counting++;
      try {
        const result = await fn();
        return { result, statements: statements - before };
      } finally {
        counting--;
      }
    },
    async stop() {
      server.closeAllConnections();
      await new Promise((r) => server.close(() => r(null)));
      await services.stop();
    },
  };
}

export type BenchApp = Awaited<ReturnType<typeof benchApp>>;

export const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
export const fmtMs = (ms: number) => (ms >= 1000 ? `${(ms / 1000).toFixed(2)} s` : `${ms.toFixed(1)} ms`);
export const fmtKb = (bytes: number) => `${(bytes / 1024).toFixed(0)} KB`;
export const against = (value: number, goal: number, fmt: (x: number) => string) => `goal ≤ ${fmt(goal)}  ${value <= goal ? "met" : `MISSED by ${fmt(value - goal)}`}`;

/** One GET, its time to the last byte, its size and the SQL statements it ran. */
export async function timedGet(app: BenchApp, pathname: string, cookie: string) {
  const t = performance.now();
  const { result, statements } = await app.statementsOf(async () => {
    const res = await fetch(app.url + pathname, { headers: { cookie }, redirect: "manual" });
    const body = await res.arrayBuffer();
    return { status: res.status, bytes: body.byteLength, body };
  });
  return { ms: performance.now() - t, statements, ...result };
}

/** Warm figures of a GET: one warm-up, then the median of `runs`. */
export async function warmGet(app: BenchApp, pathname: string, cookie: string, runs = 9) {
  const first = await timedGet(app, pathname, cookie);
  if (first.status !== 200) throw new Error(`GET ${pathname}: ${first.status}`);
  const times: number[] = [];
  let last = first;
  // the fewest statements of the runs: a background sweep (housekeeping) may fall into one
  let statements = Infinity;
  for (let i = 0; i < runs; i++) {
    last = await timedGet(app, pathname, cookie);
    times.push(last.ms);
    statements = Math.min(statements, last.statements);
  }
  return { cold: first.ms, warm: median(times), bytes: last.bytes, statements, body: last.body };
}
