// For tests/run.ts: copies a migrated and seeded database into fresh ones, one per vitest
// worker, faster than migrating and seeding each (a few CREATE TABLE … SELECT instead of ~8 s
// of migrations and seeders each). SHOW CREATE TABLE keeps the keys, foreign keys and
// AUTO_INCREMENT counters; the schema has no views, triggers or routines.
import mariadb from "mariadb";

export interface CloneOptions {
  host: string;
  port: number;
  user: string;
  password: string;
  from: string;
  to: string[];
}

const quoted = (name: string) => {
  if (!/^[A-Za-z0-9_]+$/.test(name)) throw new Error(`Not a plain database or table name: ${name}`);
  return `\`${name}\``;
};

export async function cloneDatabase({ host, port, user, password, from, to }: CloneOptions) {
  const conn = await mariadb.createConnection({ host, port, user, password, database: from, multipleStatements: false });
  try {
    const tables = ((await conn.query("SHOW FULL TABLES WHERE Table_type = 'BASE TABLE'")) as Record<string, string>[]).map((row) => Object.values(row)[0]);
    const creates: [string, string][] = [];
    for (const table of tables) {
      const [row] = (await conn.query(`SHOW CREATE TABLE ${quoted(table)}`)) as Record<string, string>[];
      creates.push([table, row["Create Table"]]);
    }
    await conn.query("SET SESSION foreign_key_checks = 0, SESSION max_statement_time = 0");
    for (const target of to) {
      await conn.query(`DROP DATABASE IF EXISTS ${quoted(target)}`);
      await conn.query(`CREATE DATABASE ${quoted(target)} CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
      await conn.query(`USE ${quoted(target)}`);
      for (const [table, create] of creates) {
        await conn.query(create);
        await conn.query(`INSERT INTO ${quoted(target)}.${quoted(table)} SELECT * FROM ${quoted(from)}.${quoted(table)}`);
      }
    }
  } finally {
    await conn.end();
  }
}
