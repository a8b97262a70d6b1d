// Starts the local services Nightshare needs (a private MariaDB, the mail catcher, the payment
// fake) as child processes. Shared by `npm start`, `npm run dev` and `npm test`.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { existsSync, mkdirSync, openSync } from "node:fs";
import net from "node:net";
import path from "node:path";

export const repoRoot = path.resolve(import.meta.dirname, "../..");

export interface Service {
  name: string;
  child: ChildProcess;
  stop(): Promise<void>;
}

export async function isPortFree(port: number, host = "127.0.0.1"): Promise<boolean> {
  return new Promise((resolve) => {
    const server = net.createServer();
    server.once("error", () => resolve(false));
    server.listen(port, host, () => server.close(() => resolve(true)));
  });
}

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

async function waitFor(check: () => Promise<boolean>, what: string, timeoutMs = 60_000) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`${what} did not become ready within ${timeoutMs / 1000} s`);
}

/** Waits for a child to become ready; if it exits first or never gets ready, it is stopped and this throws. */
async function readyOrKill(child: ChildProcess, check: () => Promise<boolean>, what: string, timeoutMs = 60_000) {
  let exited: string | null = null;
  const onExit = (code: number | null, signal: string | null) => (exited = signal ? `signal ${signal}` : `exit ${code}`);
  child.once("exit", onExit);
  try {
    await waitFor(async () => {
      if (exited) throw new Error(`${what} stopped while starting (${exited})`);
      return check();
    }, what, timeoutMs);
  } catch (error) {
    if (child.exitCode === null && child.signalCode === null) child.kill("SIGKILL");
    throw error;
  } finally {
    child.off("exit", onExit);
  }
}

function portAccepts(port: number, host = "127.0.0.1"): Promise<boolean> {
  return new Promise((resolve) => {
    const socket = net.connect(port, host);
    socket.once("connect", () => {
      socket.destroy();
      resolve(true);
    });
    socket.once("error", () => resolve(false));
  });
}

function stopper(name: string, child: ChildProcess): Service {
  return {
    name,
    child,
    stop: () =>
      new Promise<void>((resolve) => {
        if (child.exitCode !== null || child.signalCode !== null) return resolve();
        const timer = setTimeout(() => child.kill("SIGKILL"), 10_000);
        child.once("exit", () => {
          clearTimeout(timer);
          resolve();
        });
        child.kill("SIGTERM");
      }),
  };
}

function privateDir(parent: string, name: string) {
  const dir = path.join(parent, name);
  mkdirSync(dir, { recursive: true });
  return dir;
}

function logFile(dir: string, name: string) {
  mkdirSync(dir, { recursive: true });
  return openSync(path.join(dir, `${name}.log`), "a");
}

export interface MariaDbOptions {
  dataDir: string;
  port: number;
  database: string;
  user: string;
  password: string;
}

/** A private MariaDB instance on 127.0.0.1 with its own data folder (never the system's server). */
export async function startMariaDb(options: MariaDbOptions): Promise<Service> {
  const { dataDir, port } = options;
  const datadir = path.join(dataDir, "data");
  const socket = path.join(dataDir, "mariadb.sock");
  const asRoot = process.getuid?.() === 0;
  if (!existsSync(path.join(datadir, "mysql"))) {
    mkdirSync(datadir, { recursive: true });
    const init = spawnSync(
      "mariadb-install-db",
      [
        "--no-defaults",
        `--datadir=${datadir}`,
        "--auth-root-authentication-method=socket",
        "--skip-test-db",
        ...(asRoot ? ["--user=root"] : []),
      ],
      { encoding: "utf8" },
    );
    if (init.status !== 0) throw new Error(`mariadb-install-db failed:\n${init.stderr || init.stdout}`);
  }
  if (!(await isPortFree(port))) {
    throw new Error(`Port ${port} for the private MariaDB is in use; set DATABASE_PORT to a free port.`);
  }
  const out = logFile(dataDir, "mariadb");
  const child = spawn(
    "mariadbd",
    [
      "--no-defaults",
      `--datadir=${datadir}`,
      `--socket=${socket}`,
      `--pid-file=${path.join(dataDir, "mariadb.pid")}`,
      `--port=${port}`,
      "--bind-address=127.0.0.1",
      "--skip-name-resolve",
      "--character-set-server=utf8mb4",
      "--collation-server=utf8mb4_unicode_ci",
      "--max-allowed-packet=64M",
      "--innodb-buffer-pool-size=128M",
      ...(asRoot ? ["--user=root"] : []),
    ],
    { stdio: ["ignore", out, out], env: { ...process.env, PATH: `${process.env.PATH}:/usr/sbin` } },
  );
  await readyOrKill(child, () => portAccepts(port), "MariaDB");
  const sql = [
    `CREATE DATABASE IF NOT EXISTS \`${options.database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;`,
    `CREATE USER IF NOT EXISTS '${options.user}'@'127.0.0.1' IDENTIFIED BY '${options.password}';`,
    `ALTER USER '${options.user}'@'127.0.0.1' IDENTIFIED BY '${options.password}';`,
    `GRANT ALL PRIVILEGES ON \`${options.database}\`.* TO '${options.user}'@'127.0.0.1';`,
    `GRANT ALL PRIVILEGES ON \`${options.database}\\_%\`.* TO '${options.user}'@'127.0.0.1';`,
  ].join("\n");
  const setup = spawnSync("mariadb", [`--socket=${socket}`, "-uroot"], { input: sql, encoding: "utf8" });
  if (setup.status !== 0) throw new Error(`MariaDB user set-up failed:\n${setup.stderr}`);
  return stopper("mariadb", child);
}

/** maildev: SMTP on smtpPort and its web UI and REST API (/api/email) on webPort, loopback only. */
export async function startMaildev(options: { smtpPort: number; webPort: number; logDir: string }) {
  const out = logFile(options.logDir, "maildev");
  const bin = path.join(repoRoot, "node_modules/.bin/maildev");
  const child = spawn(
    bin,
    [
      "--smtp", String(options.smtpPort),
      "--web", String(options.webPort),
      "--ip", "127.0.0.1",
      "--web-ip", "127.0.0.1",
      "--silent",
    ],
    // Its own temporary folder: maildev keeps the .eml and attachment files in <tmpdir>/maildev,
    // which every instance on the machine would share, and "delete all" empties it.
    { stdio: ["ignore", out, out], env: { ...process.env, TMPDIR: privateDir(options.logDir, "maildev-tmp") } },
  );
  await readyOrKill(child, async () => {
    try {
      const res = await fetch(`http://127.0.0.1:${options.webPort}/api/healthz`);
      return res.ok && (await portAccepts(options.smtpPort));
    } catch {
      return false;
    }
  }, "maildev");
  return stopper("maildev", child);
}

export async function startPaymentFake(options: {
  port: number;
  secretKey: string;
  webhookSecret: string;
  webhookUrl: string;
  logDir: string;
}) {
  const out = logFile(options.logDir, "payments-fake");
  // node with tsx's loader rather than the tsx wrapper: one process, so that its exit frees the port.
  const child = spawn(
    process.execPath,
    ["--import", "tsx", path.join(repoRoot, "fakes/payments/server.ts")],
    {
      cwd: repoRoot,
      stdio: ["ignore", out, out],
      env: {
        ...process.env,
        PAYMENTS_FAKE_HOST: "127.0.0.1",
        PAYMENTS_FAKE_PORT: String(options.port),
        STRIPE_SECRET_KEY: options.secretKey,
        STRIPE_WEBHOOK_SECRET: options.webhookSecret,
        PAYMENTS_WEBHOOK_URL: options.webhookUrl,
      },
    },
  );
  await readyOrKill(child, () => portAccepts(options.port), "payment fake");
  return stopper("payments-fake", child);
}

export interface Supervised extends Service {
  /** How many times the child was started again after it stopped on its own. */
  readonly restarts: number;
}

/**
 * Keeps a service running: when its child stops without being asked to, it is started again
 * after a back-off (1 s, 2 s, 4 s … at most 30 s; back to 1 s once a child has run for a
 * minute), with a log line each time. `stop()` ends the supervision and the child. The first
 * start is not retried: if a service cannot start at all, the caller hears about it.
 */
export async function supervise(
  name: string,
  start: () => Promise<Service>,
  {
    log = (line: string) => console.log(line),
    minDelayMs = 1_000,
    maxDelayMs = 30_000,
    stableMs = 60_000,
    // false while the caller shuts down (Ctrl-C reaches every child at once, before stop() is called)
    shouldRestart = (): boolean => true,
  } = {},
): Promise<Supervised> {
  let current = await start();
  let stopping = false;
  let delay = minDelayMs;
  let restarts = 0;
  let timer: NodeJS.Timeout | null = null;
  let starting: Promise<void> | null = null;
  const seconds = (ms: number) => `${ms / 1000} s`;

  const schedule = () => {
    const wait = delay;
    delay = Math.min(delay * 2, maxDelayMs);
    timer = setTimeout(() => {
      timer = null;
      if (stopping || !shouldRestart()) return;
      starting = start().then(
        async (service) => {
          if (stopping) return service.stop();
          current = service;
          restarts++;
          log(`[supervisor] ${name} is running again (restart ${restarts}, pid ${service.child.pid})`);
          watch(service);
        },
        (error: unknown) => {
          if (stopping) return;
          log(`[supervisor] ${name} did not start again: ${error instanceof Error ? error.message : error}; next try in ${seconds(delay)}`);
          schedule();
        },
      ).finally(() => (starting = null));
    }, wait);
  };

  const watch = (service: Service) => {
    const startedAt = Date.now();
    service.child.once("exit", (code, signal) => {
      if (stopping || !shouldRestart()) return;
      if (Date.now() - startedAt >= stableMs) delay = minDelayMs;
      log(`[supervisor] ${name} stopped (${signal ? `signal ${signal}` : `exit ${code}`}); starting it again in ${seconds(delay)}`);
      schedule();
    });
  };
  watch(current);

  return {
    name,
    get child() {
      return current.child;
    },
    get restarts() {
      return restarts;
    },
    async stop() {
      stopping = true;
      if (timer) clearTimeout(timer);
      if (starting) await starting;
      await current.stop();
    },
  };
}

/** A child process as a Service (for the app itself), stopped with SIGTERM, then SIGKILL after 10 s. */
export function childService(name: string, child: ChildProcess): Service {
  return stopper(name, child);
}

export async function stopAll(services: Service[]) {
  for (const service of [...services].reverse()) await service.stop();
}
