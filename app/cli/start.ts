// `npm start` (production build) and `npm run dev` (hot reload): starts the private MariaDB, the
// mail catcher and the payment fake (side by side), migrates and seeds, builds the app only when
// a source file is newer than the last build, then serves it. Every child is supervised: one that
// stops on its own is started again after a back-off, the others keep running. Ctrl-C stops them all.
import { spawn } from "node:child_process";
import path from "node:path";
import { buildIsFresh, sourceState, writeBuildStamp } from "./build-stamp";
import { loadEnvFiles } from "./load-env";
import {
  childService,
  isPortFree,
  repoRoot,
  startMaildev,
  startMariaDb,
  startPaymentFake,
  stopAll,
  supervise,
  type Service,
} from "./services";

const dev = process.argv.includes("--dev");
process.env.NODE_ENV = dev ? "development" : "production";
loadEnvFiles();

const e = process.env as Record<string, string>;
// NIGHTSHARE_DATA_DIR: where MariaDB's files and the service logs live (the restart benchmark uses its own).
const dataDir = path.resolve(repoRoot, e.NIGHTSHARE_DATA_DIR ?? ".data");
const services: Service[] = [];
let stopping = false;
const started = Date.now();
const since = () => `${((Date.now() - started) / 1000).toFixed(1)} s`;

async function shutdown(code = 0) {
  if (stopping) return;
  stopping = true;
  console.log("\n[start] stopping…");
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

  console.log(`[start] MariaDB (private instance, data in ${path.relative(repoRoot, dataDir) || "."}/mariadb), mail catcher and payment fake`);
  const opts = { shouldRestart: () => !stopping };
  const pending = [
    supervise("MariaDB", () =>
      startMariaDb({
        dataDir: path.join(dataDir, "mariadb"),
        port: Number(e.DATABASE_PORT),
        database: e.DATABASE_NAME,
        user: e.DATABASE_USER,
        password: e.DATABASE_PASSWORD,
      }),
      opts,
    ),
    supervise("the mail catcher", () => startMaildev({ smtpPort: Number(e.SMTP_PORT), webPort: Number(e.MAILDEV_WEB_PORT), logDir: dataDir }), opts),
    supervise("the payment fake", () =>
      startPaymentFake({
        port: Number(e.STRIPE_API_PORT),
        secretKey: e.STRIPE_SECRET_KEY,
        webhookSecret: e.STRIPE_WEBHOOK_SECRET,
        webhookUrl: new URL("/api/v1/payments/webhook", e.APP_URL).toString(),
        logDir: dataDir,
      }),
      opts,
    ),
  ];
  const outcomes = await Promise.allSettled(pending);
  for (const o of outcomes) if (o.status === "fulfilled") services.push(o.value);
  const failed = outcomes.find((o) => o.status === "rejected");
  if (failed) throw failed.reason;
  console.log(`[start] services ready (${since()})`);

  const bin = (name: string) => path.join(repoRoot, "node_modules/.bin", name);
  // The build (when needed) runs beside the migrations: it does not touch the database.
  const build = dev
    ? Promise.resolve()
    : buildIsFresh()
      ? (console.log("[start] the build is newer than every source file: not rebuilding"), Promise.resolve())
      : new Promise<void>((resolve, reject) => {
          console.log("[start] building the app");
          const before = sourceState();
          const child = spawn(bin("react-router"), ["build"], { stdio: "inherit", cwd: repoRoot });
          child.once("exit", (status) => (status === 0 ? (writeBuildStamp(before), resolve()) : reject(new Error("The build failed."))));
        });

  // The front (serve-local.ts and what it imports) is TypeScript: bundled to plain JavaScript
  // here (esbuild, tsx's own compiler; packages stay imports), the app process is plain node, and
  // tsx's loader does not sit on each of the build's imports (it about doubled their load time).
  // Two folders below the repository, like app/cli, so its `import.meta.dirname` paths still hold.
  const front = dev ? Promise.resolve(null) : bundleFront();

  console.log("[start] migrations and demo data");
  const { sequelize } = await import("../models/index.server");
  const { createMigrator, createSeeder } = await import("../../sequelize/migrator");
  await createMigrator(sequelize).up();
  const seeded = await createSeeder(sequelize).up();
  if (seeded.length) console.log(`[start] seeded: ${seeded.map((s) => s.name).join(", ")}`);
  await sequelize.close();
  await build;
  const frontScript = await front;

  const startApp = async () => {
    const child = dev
      ? spawn(bin("react-router"), ["dev", "--host", e.HOST ?? "127.0.0.1", "--port", String(appPort), "--strictPort"], { stdio: "inherit", cwd: repoRoot })
      : frontScript
        ? spawn(process.execPath, [frontScript], { stdio: "inherit", cwd: repoRoot })
        : // without the bundle: the TypeScript front through tsx's loader
          spawn(process.execPath, ["--import", "tsx", path.join(repoRoot, "app/cli/serve-local.ts")], { stdio: "inherit", cwd: repoRoot });
    return childService("app", child);
  };
  services.push(await supervise("the app", startApp, opts));

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

  A child that stops is started again (see the [supervisor] lines).
  Ctrl-C stops everything started here; the data stays in ${path.relative(repoRoot, dataDir) || "."}/.
  [start] ready in ${since()}
`);
} catch (error) {
  console.error(`[start] ${error instanceof Error ? error.message : error}`);
  await shutdown(1);
}

/** The bundled front's path, or null when esbuild failed (the app is then served through tsx). */
async function bundleFront(): Promise<string | null> {
  const outfile = path.join(repoRoot, ".data/front/serve-local.mjs");
  try {
    const { bundle } = await import("./node-bundles");
    await bundle(path.join(repoRoot, "app/cli/serve-local.ts"), outfile);
    return outfile;
  } catch (error) {
    console.error("[start] could not bundle the HTTP front; serving it through tsx:", error instanceof Error ? error.message : error);
    return null;
  }
}
