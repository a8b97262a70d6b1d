import { sequelize } from "~/models/index.server";
import { createMigrator, createSeeder } from "../../sequelize/migrator";

/** Migrated and seeded (both idempotent): every test file can start from here. */
export async function ensureDatabase() {
  await createMigrator(sequelize).up();
  await createSeeder(sequelize).up();
  return sequelize;
}
