// `npm test`: a throwaway MariaDB, mail catcher and payment fake on free loopback ports, then
// typecheck, build, migrations, and vitest (unit, integration and browser tests) against them.
//   npm test                      everything
//   npm test -- tests/integration filters passed on to vitest
//   npm run test:e2e              only the browser tests
// Test files run in parallel, TEST_WORKERS at once (default 3): each vitest worker gets its own
// database (a copy of the migrated and seeded one), mail catcher, payment fake and app port (a
// "slot", applied by tests/helpers/worker-slot.ts), on the one MariaDB server.
import { spawnSync } from "node:child_process";
import { readFileSync, rmSync } from "node:fs";
import path from "node:path";
import { parseEnv } from "node:util";
import { cloneDatabase } from "./helpers/clone-db";
import { freePort, repoRoot, startMaildev, startMariaDb, startPaymentFake, stopAll, type Service } from "../app/cli/services";

const args = process.argv.slice(2);
const onlyE2e = args[0] === "--only" && args[1] === "e2e";
const filters = onlyE2e ? ["tests/e2e"] : args;

const runDir = path.join(repoRoot, ".data", `test-${Date.now()}`);
const base = parseEnv(readFileSync(path.join(repoRoot, ".env.example"), "utf8"));
const workers = Number(process.env.TEST_WORKERS ?? 3);
if (!Number.isInteger(workers) || workers < 1 || workers > 8) throw new Error(`TEST_WORKERS must be a whole number from 1 to 8, not "${process.env.TEST_WORKERS}".`);
const taken = new Set<number>();
/** A free port not handed out before in this run (the system may offer a just-closed one again). */
async function newPort() {
  for (;;) {
    const port = await freePort();
    if (!taken.has(port)) return taken.add(port), port;
  }
}
const dbPort = await newPort();
const template = "nightshare_test";
/** What a worker's environment differs in (tests/helpers/worker-slot.ts applies it by VITEST_POOL_ID). */
const slots: Record<string, string>[] = [];
for (let i = 1; i <= workers; i++) {
  const [smtpPort, webPort, paymentsPort, appPort] = [await newPort(), await newPort(), await newPort(), await newPort()];
  slots.push({
    DATABASE_NAME: `${template}_${i}`,
    SMTP_PORT: String(smtpPort),
    MAILDEV_WEB_PORT: String(webPort),
    STRIPE_API_PORT: String(paymentsPort),
    PORT: String(appPort),
    APP_URL: `http://127.0.0.1:${appPort}`,
  });
}
const env: Record<string, string> = {
  ...(base as Record<string, string>),
  NODE_ENV: "test",
  DATABASE_PORT: String(dbPort),
  // slot 1's services, but the template database (migrations and seeders run on it)
  ...slots[0],
  DATABASE_NAME: template,
  NIGHTSHARE_BUILD_DIR: path.join(runDir, "build"),
  NIGHTSHARE_TEST_SLOTS: JSON.stringify(slots),
  TEST_WORKERS: String(workers),
};

function step(title: string, command: string, commandArgs: string[], extraEnv: Record<string, string> = {}) {
  console.log(`\n=== ${title}`);
  const started = Date.now();
  const result = spawnSync(command, commandArgs, {
    cwd: repoRoot,
    stdio: "inherit",
    env: { ...process.env, ...env, ...extraEnv },
  });
  console.log(`=== ${title}: ${result.status === 0 ? "ok" : `failed (exit ${result.status})`} in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  return result.status ?? 1;
}

/** The migrated and seeded template, copied into each slot's database. */
async function copyTemplate() {
  console.log(`\n=== database per worker`);
  const started = Date.now();
  await cloneDatabase({
    host: env.DATABASE_HOST,
    port: dbPort,
    user: env.DATABASE_USER,
    password: env.DATABASE_PASSWORD,
    from: template,
    to: slots.map((slot) => slot.DATABASE_NAME),
  });
  console.log(`=== database per worker: ok (${slots.length === 1 ? "one copy" : `${slots.length} copies`} of ${template}) in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  return 0;
}

const services: Service[] = [];
let exitCode = 1;
try {
  console.log(`=== services in ${path.relative(repoRoot, runDir)}: MariaDB ${dbPort}; ${workers} worker slots (SMTP, mail web, payments, app): ${slots.map((s) => [s.SMTP_PORT, s.MAILDEV_WEB_PORT, s.STRIPE_API_PORT, s.PORT].join("/")).join(", ")}`);
  services.push(
    await startMariaDb({
      dataDir: path.join(runDir, "mariadb"),
      port: dbPort,
      database: env.DATABASE_NAME,
      user: env.DATABASE_USER,
      password: env.DATABASE_PASSWORD,
    }),
  );
  const started = await Promise.allSettled(
    slots.flatMap((slot, i) => [
      startMaildev({ smtpPort: Number(slot.SMTP_PORT), webPort: Number(slot.MAILDEV_WEB_PORT), logDir: path.join(runDir, `slot-${i + 1}`) }),
      startPaymentFake({
        port: Number(slot.STRIPE_API_PORT),
        secretKey: env.STRIPE_SECRET_KEY,
        webhookSecret: env.STRIPE_WEBHOOK_SECRET,
        webhookUrl: `${slot.APP_URL}/api/v1/payments/webhook`,
        logDir: path.join(runDir, `slot-${i + 1}`),
      }),
    ]),
  );
  for (const result of started) if (result.status === "fulfilled") services.push(result.value);
  const failed = started.find((result) => result.status === "rejected");
  if (failed) throw failed.reason;
  const bin = (name: string) => path.join(repoRoot, "node_modules/.bin", name);
  const typecheck = onlyE2e || process.env.SKIP_TYPECHECK ? 0 : step("typecheck", "npm", ["run", "--silent", "typecheck"]);
  const build = step("build", bin("react-router"), ["build"], { NODE_ENV: "production" });
  const migrate = step("migrations", bin("tsx"), ["sequelize/cli.ts", "migrate"]) || step("seed", bin("tsx"), ["sequelize/cli.ts", "seed"]) || (await copyTemplate());
  const vitest = build || migrate ? 1 : step("vitest", bin("vitest"), ["run", "--config", "tests/vitest.config.ts", ...filters]);
  exitCode = typecheck || build || migrate || vitest;
  if (typecheck) console.log("\nThe typecheck failed (see above), so the run fails even where the tests passed.");
} catch (error) {
  console.error(error);
} finally {
  await stopAll(services);
  if (!process.env.KEEP_TEST_DATA) rmSync(runDir, { recursive: true, force: true });
}
process.exit(exitCode);
