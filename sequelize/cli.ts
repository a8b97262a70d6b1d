// `npm run db:migrate [-- down]` and `npm run db:seed`. Reads the environment like the app does.
import { loadEnvFiles } from "../app/cli/load-env";

loadEnvFiles();
const [command, direction] = process.argv.slice(2);
const { sequelize } = await import("../app/models/index.server");
const { createMigrator, createSeeder } = await import("./migrator");

try {
  if (command === "migrate") {
    const migrator = createMigrator(sequelize);
    const done = direction === "down" ? await migrator.down() : await migrator.up();
    console.log(`${direction === "down" ? "reverted" : "applied"}: ${done.map((m) => m.name).join(", ") || "nothing to do"}`);
  } else if (command === "seed") {
    const done = await createSeeder(sequelize).up();
    console.log(`seeded: ${done.map((m) => m.name).join(", ") || "nothing to do"}`);
  } else {
    console.error("usage: tsx sequelize/cli.ts migrate [down] | seed");
    process.exitCode = 2;
  }
} finally {
  await sequelize.close();
}
