// `npm start` (production build) and `npm run dev` (hot reload): starts the private MariaDB, the
// mail catcher and the payment fake, migrates and seeds, then serves the app. Ctrl-C stops them all.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import path from "node:path";
import { loadEnvFiles } from "./load-env";
import {
  isPortFree,
  repoRoot,
  startMaildev,
  startMariaDb,
  startPaymentFake,
  stopAll,
  type Service,
} from "./services";

const dev = process.argv.includes("--dev");
process.env.NODE_ENV = dev ? "development" : "production";
loadEnvFiles();

const e = process.env as Record<string, string>;
const dataDir = path.join(repoRoot, ".data");
const services: Service[] = [];
let app: ChildProcess | null = null;
let stopping = false;

async function shutdown(code = 0) {
  if (stopping) return;
  stopping = true;
  console.log("\n[start] stopping…");
  if (app && app.exitCode === null) {
    app.kill("SIGTERM");
    await new Promise((r) => app!.once("exit", r));
  }
  await stopAll(services);
  process.exit(code);
}
process.on("SIGINT", () => void shutdown(0));
process.on("SIGTERM", () => void shutdown(0));

async function requireFree(port: number, what: string, variable: string) {
  if (!(await isPortFree(port))) throw new Error(`Port ${port} for ${what} is in use. Stop what uses it, or set ${variable}.`);
}

try {
  const appPort = Number(e.PORT ?? 3000);
  await requireFree(appPort, "the app", "PORT");
  await requireFree(Number(e.SMTP_PORT), "the mail catcher (SMTP)", "SMTP_PORT");
  await requireFree(Number(e.MAILDEV_WEB_PORT), "the mail catcher (web)", "MAILDEV_WEB_PORT");
  await requireFree(Number(e.STRIPE_API_PORT), "the payment fake", "STRIPE_API_PORT");

  console.log("[start] MariaDB (private instance, data in .data/mariadb)");
  services.push(
    await startMariaDb({
      dataDir: path.join(dataDir, "mariadb"),
      port: Number(e.DATABASE_PORT),
      database: e.DATABASE_NAME,
      user: e.DATABASE_USER,
      password: e.DATABASE_PASSWORD,
    }),
  );
  console.log("[start] mail catcher and payment fake");
  services.push(await startMaildev({ smtpPort: Number(e.SMTP_PORT), webPort: Number(e.MAILDEV_WEB_PORT), logDir: dataDir }));
  services.push(
    await startPaymentFake({
      port: Number(e.STRIPE_API_PORT),
      secretKey: e.STRIPE_SECRET_KEY,
      webhookSecret: e.STRIPE_WEBHOOK_SECRET,
      webhookUrl: new URL("/api/v1/payments/webhook", e.APP_URL).toString(),
      logDir: dataDir,
    }),
  );

  console.log("[start] migrations and demo data");
  const { sequelize } = await import("../models/index.server");
  const { createMigrator, createSeeder } = await import("../../sequelize/migrator");
  await createMigrator(sequelize).up();
  const seeded = await createSeeder(sequelize).up();
  if (seeded.length) console.log(`[start] seeded: ${seeded.map((s) => s.name).join(", ")}`);
  await sequelize.close();

  const bin = (name: string) => path.join(repoRoot, "node_modules/.bin", name);
  if (dev) {
    app = spawn(bin("react-router"), ["dev", "--host", e.HOST ?? "127.0.0.1", "--port", String(appPort), "--strictPort"], {
      stdio: "inherit",
      cwd: repoRoot,
    });
  } else {
    console.log("[start] building the app");
    const build = spawnSync(bin("react-router"), ["build"], { stdio: "inherit", cwd: repoRoot });
    if (build.status !== 0) throw new Error("The build failed.");
    app = spawn(bin("tsx"), [path.join(repoRoot, "app/cli/serve-local.ts")], { stdio: "inherit", cwd: repoRoot });
  }
  app.once("exit", (code) => {
    if (!stopping) {
      console.error(`[start] the app stopped (exit ${code}).`);
      void shutdown(code ?? 1);
    }
  });

  console.log(`
  Nightshare        ${e.APP_URL}
  Mail catcher      http://127.0.0.1:${e.MAILDEV_WEB_PORT}   (sign-in codes and every other e-mail)
  Payment fake      http://127.0.0.1:${e.STRIPE_API_PORT}    (test card 4242 4242 4242 4242)
  MariaDB           127.0.0.1:${e.DATABASE_PORT}, database ${e.DATABASE_NAME}

  Demo sign-ins (ask for a code, read it in the mail catcher):
    pi@kestrel-ridge.example        proposer
    reviewer@kestrel-ridge.example  reviewer
    chair@kestrel-ridge.example     chair of the TAC
    admin@kestrel-ridge.example     observatory office

  Ctrl-C stops everything started here; the data stays in .data/.
`);
} catch (error) {
  console.error(`[start] ${error instanceof Error ? error.message : error}`);
  await shutdown(1);
}
