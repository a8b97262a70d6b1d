// Throwaway services for the benchmarks that need a database: a private MariaDB and a mail
// catcher on free loopback ports in .data/bench-<time>/, the environment set for the app's
// modules (import them after this), migrated and seeded.
import { readFileSync, rmSync } from "node:fs";
import path from "node:path";
import { parseEnv } from "node:util";
import { freePort, repoRoot, startMaildev, startMariaDb, stopAll, type Service } from "../../app/cli/services";

export async function benchServices({ nodeEnv = "test" }: { nodeEnv?: "test" | "production" } = {}) {
  const runDir = path.join(repoRoot, ".data", `bench-${Date.now()}`);
  const base = parseEnv(readFileSync(path.join(repoRoot, ".env.example"), "utf8")) as Record<string, string>;
  const [dbPort, smtpPort, webPort, appPort] = await Promise.all([freePort(), freePort(), freePort(), freePort()]);
  Object.assign(process.env, {
    ...base,
    NODE_ENV: nodeEnv,
    DATABASE_PORT: String(dbPort),
    DATABASE_NAME: "nightshare_bench",
    SMTP_PORT: String(smtpPort),
    MAILDEV_WEB_PORT: String(webPort),
    PORT: String(appPort),
    APP_URL: `http://127.0.0.1:${appPort}`,
  });
  const services: Service[] = [];
  services.push(
    await startMariaDb({ dataDir: path.join(runDir, "mariadb"), port: dbPort, database: "nightshare_bench", user: base.DATABASE_USER, password: base.DATABASE_PASSWORD }),
  );
  services.push(await startMaildev({ smtpPort, webPort, logDir: runDir }));
  const { sequelize } = await import("../../app/models/index.server");
  const { createMigrator, createSeeder } = await import("../../sequelize/migrator");
  await createMigrator(sequelize).up();
  await createSeeder(sequelize).up();
  return {
    sequelize,
    async stop() {
      await sequelize.close();
      await stopAll(services);
      rmSync(runDir, { recursive: true, force: true });
    },
  };
}
