// Issue 7, item 11: the science API weighs each request by its cost, runs heavy computations in
// a bounded worker pool, and answers 429/503 with Retry-After and a JSON body, while cheap
// requests and other pages still answer.
import { describe, expect, it } from "vitest";
import { COST_BUDGET_PER_MINUTE, epochPlanCost } from "~/lib/http/science-api.server";
import { request } from "../helpers/app";

const SITE = { latitudeDeg: 31.9, longitudeDeg: -111.6, elevationM: 2100, timeZone: "america/PHOENIX" };

function sixYearPlan(i: number) {
  return {
    site: SITE,
    target: { ra: `${String(i % 24).padStart(2, "0")}:10:00`, dec: "+20:00:00" },
    firstDate: "2027-02-01",
    baselineYears: 6,
    epochs: 60,
    perEpochPrecisionMas: 2,
  };
}

describe("cost-aware limits of the science API", () => {
  it("prices a request by its size: a six-year plan costs its 2193 nights and 60 epochs", () => {
    expect(epochPlanCost({ baselineYears: 6, epochs: 60 })).toBe(Math.min(Math.round(6 * 365.25) + 1, 366 * 6) + 60);
    expect(epochPlanCost({ baselineYears: 1, epochs: 5 })).toBeLessThan(epochPlanCost({ baselineYears: 6, epochs: 5 }));
  });

  it("answers a flood of heavy plans with 429/503 + Retry-After + JSON, while cheap requests still answer", async () => {
    const agent = await request();
    const flood = Array.from({ length: 24 }, (_, i) => agent.post("/api/v1/epoch-plan").send(sixYearPlan(i)));
    // while the flood is being handled, the health page and a page of the app still answer
    const health = await agent.get("/healthz");
    const home = await agent.get("/calls");
    const answers = await Promise.all(flood);

    expect(health.status).toBe(200);
    expect(home.status).toBe(200);

    const refused = answers.filter((r) => r.status === 429 || r.status === 503);
    const statuses = answers.map((r) => r.status);
    // 24 six-year plans cost more than the minute's budget: some must be refused
    expect(24 * epochPlanCost({ baselineYears: 6, epochs: 60 })).toBeGreaterThan(COST_BUDGET_PER_MINUTE);
    expect(refused.length, `statuses ${statuses.join(",")}`).toBeGreaterThan(0);
    expect(statuses.every((s) => s === 200 || s === 429 || s === 503), `statuses ${statuses.join(",")}`).toBe(true);
    for (const r of refused) {
      expect(r.headers["content-type"]).toMatch(/application\/json/);
      expect(Number(r.headers["retry-after"])).toBeGreaterThan(0);
      expect(typeof r.body.error).toBe("string");
    }
    // the accepted ones are real plans
    const ok = answers.filter((r) => r.status === 200);
    expect(ok.length).toBeGreaterThan(0);
    for (const r of ok) expect(r.body.epochs.length).toBeGreaterThan(0);
    // the zone was canonicalised before use
    expect(ok[0].body.site.timeZone).toBe("America/Phoenix");
  }, 180_000);

  it("refuses one request that alone costs more than the whole budget as bad input (400)", async () => {
    // 366 nights of visibility is 366 units; the budget bounds it, so the API's maximum fits
    expect(366).toBeLessThan(COST_BUDGET_PER_MINUTE);
    const res = await (await request()).post("/api/v1/epoch-plan").send({ ...sixYearPlan(0), epochs: 61 });
    expect(res.status).toBe(400);
    expect(res.body.issues.map((i: { path: string }) => i.path)).toContain("epochs");
  });
});
