// The epoch planner of the science API names each epoch's semester by the office's own dates:
// here an invented call whose semester runs October–March, where the default rule (B = 1 Aug –
// 31 Jan) would name February and March the next year's A.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Call } from "~/models/index.server";
import { request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";

const CODE = "2093B";
let callId = 0;

beforeAll(async () => {
  await ensureDatabase();
  const call = await Call.create({
    semesterCode: CODE,
    title: `Test call ${CODE}`,
    opensAt: new Date("2093-01-01T00:00:00Z"),
    deadlineAt: new Date("2093-06-01T00:00:00Z"),
    semesterStart: "2093-10-01",
    semesterEnd: "2094-03-31",
    pageLimit: 4,
  });
  callId = call.id;
});

afterAll(async () => {
  await Call.destroy({ where: { id: callId } });
});

describe("POST /api/v1/epoch-plan semesters", () => {
  it("are the calls' semesters, then six-month ones following on", async () => {
    const res = await (await request()).post("/api/v1/epoch-plan").send({
      site: { latitudeDeg: 31.3, longitudeDeg: -108.7, elevationM: 2100, timeZone: "America/Denver" },
      target: { ra: "05:36:48", dec: "+18:30:00" },
      firstDate: "2093-10-01",
      baselineYears: 1,
      epochs: 8,
      perEpochPrecisionMas: 4,
      maxAirmass: 1.6,
    });
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200);
    const epochs = res.body.epochs as { date: string; semester: string }[];
    expect(epochs).toHaveLength(8);
    // the months where the office's dates and the default rule disagree hold epochs
    expect(epochs.filter((e) => e.date >= "2094-02-01" && e.date <= "2094-03-31").length).toBeGreaterThan(0);
    // after the call's semester: 2094A from 1 April to 30 September (six months on)
    for (const e of epochs) expect([e.date, e.semester]).toEqual([e.date, e.date <= "2094-03-31" ? CODE : e.date <= "2094-09-30" ? "2094A" : "2094B"]);
  });
});
