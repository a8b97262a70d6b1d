import { QueryTypes } from "sequelize";
import { afterAll, describe, expect, it } from "vitest";
import { Op } from "sequelize";
import { Call, Filter, Observation, Proposal, ReviewAssignment, RoleGrant, Target, Telescope, User, sequelize } from "~/models/index.server";
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
    expect(first.calls).toBeGreaterThanOrEqual(3);
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

  it("place the demo calls around today: the running semester decided, the next one past its deadline with sent proposals, the one after open", async () => {
    const now = new Date();
    const today = now.toISOString().slice(0, 10);
    const calls = await Call.findAll({ where: { title: { [Op.like]: "Call for proposals %" } }, order: [["semesterStart", "ASC"]] });
    const running = calls.find((c) => c.semesterStart <= today && today <= c.semesterEnd)!;
    expect(running, "a call for the semester running today").toBeDefined();
    const after = calls.filter((c) => c.semesterStart > running.semesterEnd);
    const [review, open] = after;
    expect(running.deadlineAt.getTime()).toBeLessThan(now.getTime());
    expect(review.deadlineAt.getTime()).toBeLessThan(now.getTime());
    expect(open.opensAt.getTime()).toBeLessThan(now.getTime());
    expect(open.deadlineAt.getTime()).toBeGreaterThan(now.getTime());
    expect(open.deadlineAt.toISOString().slice(0, 10) < open.semesterStart).toBe(true);
    const states = async (callId: number) => new Set((await Proposal.findAll({ where: { callId } })).map((p) => p.status));
    const decided = await states(running.id);
    expect([...decided].every((s) => ["accepted", "waitlisted", "declined"].includes(s))).toBe(true);
    expect(decided.has("accepted")).toBe(true);
    // the review seeder puts the sent proposals of that call in review, with assignments committed
    expect(await Proposal.count({ where: { callId: review.id, status: "in_review" } })).toBeGreaterThanOrEqual(5);
    expect(await Proposal.count({ where: { callId: review.id, status: "submitted" } })).toBe(0);
    expect(await ReviewAssignment.count({ where: { callId: review.id, status: "submitted" } })).toBeGreaterThan(0);
    expect(await Proposal.count({ where: { callId: review.id, status: "draft" } })).toBe(0);
    expect(await Proposal.count({ where: { callId: open.id, status: "draft" } })).toBeGreaterThanOrEqual(3);
    // every code is serial/short semester, e.g. 014/27A
    for (const p of await Proposal.findAll({ where: { code: { [Op.ne]: null } }, include: [{ model: Call, as: "call" }] })) {
      expect(p.code).toBe(`${String(p.serial).padStart(3, "0")}/${p.call!.semesterCode.slice(2)}`);
    }
  });

  it("hold one survey of 500 fields led by the demo PI, one observation each", async () => {
    const survey = await Proposal.findOne({ where: { title: { [Op.like]: "The Wren Survey%" } } });
    expect(survey).not.toBeNull();
    expect(await Target.count({ where: { proposalId: survey!.id } })).toBe(500);
    expect(await Observation.count({ where: { proposalId: survey!.id } })).toBe(500);
    expect(survey!.abstract).toContain("500");
  });

  it("turn stored NS-<semester>-NNN codes into serial/short semester", async () => {
    const migrator = createMigrator(sequelize);
    const [last] = (await migrator.executed()).filter((m) => m.name.startsWith("20261202050000"));
    expect(last).toBeDefined();
    await migrator.down({ to: last.name });
    // only columns that exist at that migration: later ones (e.g. proposals.decisionSentAt) are gone here
    const coded = (await Proposal.findOne({ attributes: ["id", "serial", "code"], where: { code: { [Op.ne]: null } }, include: [{ model: Call, as: "call", attributes: ["id", "semesterCode"] }] }))!;
    await sequelize.query("UPDATE proposals SET code = :code WHERE id = :id", { replacements: { code: `NS-${coded.call!.semesterCode}-${String(coded.serial).padStart(3, "0")}`, id: coded.id } });
    await migrator.up();
    const [row] = await sequelize.query<{ code: string }>("SELECT code FROM proposals WHERE id = :id", { replacements: { id: coded.id }, type: QueryTypes.SELECT });
    expect(row.code).toBe(`${String(coded.serial).padStart(3, "0")}/${coded.call!.semesterCode.slice(2)}`);
    expect(row.code).toMatch(/^\d{3}\/\d{2}[AB]$/);
    // the round trip dropped every later table (review, allocation, decisions, charges, epochs)
    // with the demo's rows in them: seed again, so that files running after this one find the demo
    await sequelize.query("DELETE FROM seed_runs");
    await createSeeder(sequelize).up();
  });
});
