import path from "node:path";
import type { QueryInterface, Sequelize } from "sequelize";
import { SequelizeStorage, Umzug } from "umzug";

const here = import.meta.dirname;

interface Step<Context> {
  up(params: { context: Context }): Promise<unknown>;
  down(params: { context: Context }): Promise<unknown>;
}

// Import through this module (not umzug's own import()), so that tsx and vitest both load the .ts files.
function resolver<Context>() {
  return ({ name, path: file, context }: { name: string; path?: string; context: Context }) => ({
    name,
    up: async () => ((await import(/* @vite-ignore */ file!)) as Step<Context>).up({ context }),
    down: async () => ((await import(/* @vite-ignore */ file!)) as Step<Context>).down({ context }),
  });
}

/** The schema's migrations, run in order and recorded in `schema_migrations`. */
export function createMigrator(sequelize: Sequelize) {
  return new Umzug<QueryInterface>({
    migrations: { glob: path.join(here, "migrations/*.ts").replaceAll("\\", "/"), resolve: resolver<QueryInterface>() },
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: "schema_migrations", modelName: "SchemaMigration" }),
    logger: undefined,
  });
}

/** Demo-data seeders, each run once and recorded in `seed_runs`; each is also idempotent on its own. */
export function createSeeder(sequelize: Sequelize) {
  return new Umzug<Sequelize>({
    migrations: { glob: path.join(here, "seeders/*.ts").replaceAll("\\", "/"), resolve: resolver<Sequelize>() },
    context: sequelize,
    storage: new SequelizeStorage({ sequelize, tableName: "seed_runs", modelName: "SeedRun" }),
    logger: undefined,
  });
}
