// The office's expected clear nights per month (telescope page): saved as fractions, refused by
// the month's field with what was typed kept, emptied months removed, audited; the demo seed's
// invented values are in place for the seeded telescopes.
import { beforeAll, describe, expect, it } from "vitest";
import { AuditEntry, sequelize, Telescope, TelescopeClearFraction } from "~/models/index.server";
import { DEMO_CLEAR_FRACTIONS, up } from "../../sequelize/seeders/20261202070100-demo-allocation";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";

let admin: Awaited<ReturnType<typeof newUser>>;
let telescope: Telescope;

beforeAll(async () => {
  await ensureDatabase();
  admin = await newUser({ roles: ["admin"], name: "Weather Office" });
  telescope = await Telescope.create({ name: `Weather test ${Date.now()}`, siteName: "Elsewhere", latitudeDeg: 10, longitudeDeg: 10, elevationM: 100, timeZone: "UTC", apertureM: 0.5 });
});

const months = (values: (string | number)[]) => Object.fromEntries(values.map((v, i) => [`m${i + 1}`, v]));

describe("expected clear nights per month", () => {
  it("starts unset, saves percentages as fractions and shows them back", async () => {
    const page = await (await request()).get(`/admin/telescopes/${telescope.id}`).set("Cookie", admin.cookie);
    expect(page.status).toBe(200);
    expect(page.text).toContain("Expected clear nights per month");
    expect(await TelescopeClearFraction.count({ where: { telescopeId: telescope.id } })).toBe(0);
    const res = await (await request()).post(`/admin/telescopes/${telescope.id}`).set("Cookie", admin.cookie).type("form")
      .send(form({ intent: "clearFractions", ...months([55, 60, 62.5, 70, 75, 80, 85, 85, 80, 70, 60, ""]) }));
    expect(res.status).toBe(302);
    const rows = await TelescopeClearFraction.findAll({ where: { telescopeId: telescope.id }, order: [["month", "ASC"]] });
    expect(rows.map((r) => r.clearFraction)).toEqual([0.55, 0.6, 0.625, 0.7, 0.75, 0.8, 0.85, 0.85, 0.8, 0.7, 0.6]);
    const again = await (await request()).get(`/admin/telescopes/${telescope.id}`).set("Cookie", admin.cookie);
    expect(again.text).toContain('value="62.5"');
    const audit = await AuditEntry.findOne({ where: { action: "telescope.clear_fractions_saved", entityId: telescope.id } });
    expect(audit).not.toBeNull();
  });

  it("refuses a value out of range or not a number by its month and keeps what was typed", async () => {
    const res = await (await request()).post(`/admin/telescopes/${telescope.id}`).set("Cookie", admin.cookie).type("form")
      .send(form({ intent: "clearFractions", ...months(["abc", 60, 120, 70, 75, 80, 85, 85, 80, 70, 60, ""]) }));
    expect(res.status).toBe(400);
    expect(res.text).toContain("January: give the percentage of clear nights as a number, or leave it empty.");
    expect(res.text).toContain("March: from 0 to 100 %.");
    expect(res.text).toContain('value="abc"');
    expect((await TelescopeClearFraction.findOne({ where: { telescopeId: telescope.id, month: 1 } }))!.clearFraction).toBe(0.55);
  });

  it("removes a month left empty", async () => {
    const res = await (await request()).post(`/admin/telescopes/${telescope.id}`).set("Cookie", admin.cookie).type("form")
      .send(form({ intent: "clearFractions", ...months(["", 60, 62.5, 70, 75, 80, 85, 85, 80, 70, 60, ""]) }));
    expect(res.status).toBe(302);
    expect(await TelescopeClearFraction.findOne({ where: { telescopeId: telescope.id, month: 1 } })).toBeNull();
    expect(await TelescopeClearFraction.count({ where: { telescopeId: telescope.id } })).toBe(10);
  });

  it("is seeded with the demo's invented values for every telescope (the seeder run again on its own)", async () => {
    // other test files change the seeded telescopes' months (and put them back): the seeder is
    // checked on a telescope of this test's own, which it fills like the demo's
    const fresh = await Telescope.create({ name: `Seeded weather ${Date.now()}`, siteName: "Elsewhere", latitudeDeg: 10, longitudeDeg: 10, elevationM: 100, timeZone: "UTC", apertureM: 0.5 });
    await up({ context: sequelize });
    const rows = await TelescopeClearFraction.findAll({ where: { telescopeId: fresh.id }, order: [["month", "ASC"]] });
    expect(rows.map((r) => r.clearFraction)).toEqual(DEMO_CLEAR_FRACTIONS);
    await TelescopeClearFraction.destroy({ where: { telescopeId: fresh.id } });
    await fresh.destroy();
  });
});
