import { QueryTypes } from "sequelize";
import { afterAll, describe, expect, it } from "vitest";
import { Call, Filter, RoleGrant, Telescope, User, sequelize } from "~/models/index.server";
import { createMigrator, createSeeder } from "../../sequelize/migrator";

async function tables() {
  const rows = await sequelize.query<{ name: string }>(
    "SELECT table_name AS name FROM information_schema.tables WHERE table_schema = DATABASE()",
    { type: QueryTypes.SELECT },
  );
  return rows.map((r) => r.name).sort();
}

describe("migrations on MariaDB", () => {
  afterAll(async () => {
    // Leave the database as every other test file expects it.
    await createMigrator(sequelize).up();
    await createSeeder(sequelize).up();
  });

  it("go all the way down and up again", async () => {
    const migrator = createMigrator(sequelize);
    await migrator.up();
    const before = await tables();
    expect(before).toEqual(expect.arrayContaining(["users", "proposals", "outgoing_mail", "audit_log"]));
    await migrator.down({ to: 0 });
    expect((await tables()).filter((t) => t !== "schema_migrations" && t !== "seed_runs")).toEqual([]);
    await sequelize.query("DELETE FROM seed_runs").catch(() => undefined);
    await migrator.up();
    expect(await tables()).toEqual(before);
    expect(await migrator.pending()).toEqual([]);
  });

  it("create utf8mb4 tables", async () => {
    const rows = await sequelize.query<{ name: string; collation: string }>(
      "SELECT table_name AS name, table_collation AS collation FROM information_schema.tables WHERE table_schema = DATABASE()",
      { type: QueryTypes.SELECT },
    );
    // umzug creates its own bookkeeping tables (schema_migrations, seed_runs) in utf8mb3; ours are utf8mb4.
    for (const row of rows.filter((r) => !["schema_migrations", "seed_runs"].includes(r.name))) {
      expect(row.collation, row.name).toMatch(/^utf8mb4_/);
    }
  });

  it("seed the demo once; seeding again changes nothing", async () => {
    await createSeeder(sequelize).up();
    const counts = async () => ({
      users: await User.count(),
      grants: await RoleGrant.count(),
      telescopes: await Telescope.count(),
      filters: await Filter.count(),
      calls: await Call.count(),
    });
    const first = await counts();
    expect(first.telescopes).toBe(2);
    expect(first.filters).toBe(10);
    // 2027A (open) and 2027B (announced), and the demo's closed 2026B for the decided proposals.
    expect((await Call.findAll()).map((c) => c.semesterCode).sort()).toEqual(expect.arrayContaining(["2027A", "2027B"]));
    // Run every seeder again, bypassing the record of what ran: each one is idempotent on its own.
    await sequelize.query("DELETE FROM seed_runs");
    await createSeeder(sequelize).up();
    expect(await counts()).toEqual(first);
  });

  it("give each demo sign-in exactly its one role", async () => {
    const roles = async (email: string) =>
      (await RoleGrant.findAll({ include: [{ model: User, as: "user", where: { email } }] })).map((g) => g.role);
    expect(await roles("pi@kestrel-ridge.example")).toEqual([]);
    expect(await roles("reviewer@kestrel-ridge.example")).toEqual(["reviewer"]);
    expect(await roles("chair@kestrel-ridge.example")).toEqual(["chair"]);
    expect(await roles("admin@kestrel-ridge.example")).toEqual(["admin"]);
  });

  it("keep the 2027A call open with a deadline in the future", async () => {
    const call = await Call.findOne({ where: { semesterCode: "2027A" } });
    expect(call!.opensAt.getTime()).toBeLessThan(Date.now());
    expect(call!.deadlineAt.getTime()).toBeGreaterThan(Date.now());
  });
});
