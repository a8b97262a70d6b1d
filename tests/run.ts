// `npm test`: a throwaway MariaDB, mail catcher and payment fake on free loopback ports, then
// typecheck, build, migrations, and vitest (unit, integration and browser tests) against them.
//   npm test                      everything
//   npm test -- tests/integration filters passed on to vitest
//   npm run test:e2e              only the browser tests
import { spawnSync } from "node:child_process";
import { readFileSync, rmSync } from "node:fs";
import path from "node:path";
import { parseEnv } from "node:util";
import { freePort, repoRoot, startMaildev, startMariaDb, startPaymentFake, stopAll, type Service } from "../app/cli/services";

const args = process.argv.slice(2);
const onlyE2e = args[0] === "--only" && args[1] === "e2e";
const filters = onlyE2e ? ["tests/e2e"] : args;

const runDir = path.join(repoRoot, ".data", `test-${Date.now()}`);
const base = parseEnv(readFileSync(path.join(repoRoot, ".env.example"), "utf8"));
const [dbPort, smtpPort, webPort, paymentsPort, appPort] = await Promise.all([freePort(), freePort(), freePort(), freePort(), freePort()]);
const env: Record<string, string> = {
  ...(base as Record<string, string>),
  NODE_ENV: "test",
  DATABASE_PORT: String(dbPort),
  DATABASE_NAME: "nightshare_test",
  SMTP_PORT: String(smtpPort),
  MAILDEV_WEB_PORT: String(webPort),
  STRIPE_API_PORT: String(paymentsPort),
  PORT: String(appPort),
  APP_URL: `http://127.0.0.1:${appPort}`,
  NIGHTSHARE_BUILD_DIR: path.join(runDir, "build"),
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

const services: Service[] = [];
let exitCode = 1;
try {
  console.log(`=== services in ${path.relative(repoRoot, runDir)}: MariaDB ${dbPort}, SMTP ${smtpPort}, mail web ${webPort}, payments ${paymentsPort}`);
  services.push(
    await startMariaDb({
      dataDir: path.join(runDir, "mariadb"),
      port: dbPort,
      database: env.DATABASE_NAME,
      user: env.DATABASE_USER,
      password: env.DATABASE_PASSWORD,
    }),
  );
  services.push(await startMaildev({ smtpPort, webPort, logDir: runDir }));
  services.push(
    await startPaymentFake({
      port: paymentsPort,
      secretKey: env.STRIPE_SECRET_KEY,
      webhookSecret: env.STRIPE_WEBHOOK_SECRET,
      webhookUrl: `${env.APP_URL}/api/v1/payments/webhook`,
      logDir: runDir,
    }),
  );
  const bin = (name: string) => path.join(repoRoot, "node_modules/.bin", name);
  const typecheck = onlyE2e || process.env.SKIP_TYPECHECK ? 0 : step("typecheck", "npm", ["run", "--silent", "typecheck"]);
  const build = step("build", bin("react-router"), ["build"], { NODE_ENV: "production" });
  const migrate = step("migrations", bin("tsx"), ["sequelize/cli.ts", "migrate"]) || step("seed", bin("tsx"), ["sequelize/cli.ts", "seed"]);
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
