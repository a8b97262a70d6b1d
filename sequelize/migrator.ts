import path from "node:path";
import type { Sequelize } from "sequelize";
import { SequelizeStorage, Umzug } from "umzug";

const here = import.meta.dirname;

/** The schema's migrations, run in order and recorded in `schema_migrations`. */
export function createMigrator(sequelize: Sequelize) {
  return new Umzug({
    migrations: { glob: path.join(here, "migrations/*.ts").replaceAll("\\", "/") },
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: "schema_migrations" }),
    logger: undefined,
  });
}

/** Demo-data seeders, each run once and recorded in `seed_runs`; each is also idempotent on its own. */
export function createSeeder(sequelize: Sequelize) {
  return new Umzug({
    migrations: { glob: path.join(here, "seeders/*.ts").replaceAll("\\", "/") },
    context: sequelize,
    storage: new SequelizeStorage({ sequelize, tableName: "seed_runs" }),
    logger: undefined,
  });
}
