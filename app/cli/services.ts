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

async function waitFor(check: () => Promise<boolean>, what: string, timeoutMs = 20_000) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`${what} did not become ready within ${timeoutMs / 1000} s`);
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
  await waitFor(() => portAccepts(port), "MariaDB");
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
    { stdio: ["ignore", out, out] },
  );
  await waitFor(async () => {
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
  const child = spawn(
    path.join(repoRoot, "node_modules/.bin/tsx"),
    [path.join(repoRoot, "fakes/payments/server.ts")],
    {
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
  await waitFor(() => portAccepts(options.port), "payment fake");
  return stopper("payments-fake", child);
}

export async function stopAll(services: Service[]) {
  for (const service of [...services].reverse()) await service.stop();
}
