import { describe, expect, it } from "vitest";
import { boardOrder, fillByRank, type Cell } from "./fill";

// Hand-built cases: 100 dark hours offered on telescope 1, assured up to 80 %, filler margin 30 %.
const base = { semesterCode: "27A", offered: [{ telescopeId: 1, moonCategory: "dark" as const, hours: 100 }], assuredShareLimit: 0.8, fillerMargin: 0.3 };
const dark = (hours: number, semesterCode = "27A"): Cell => ({ telescopeId: 1, moonCategory: "dark", semesterCode, hours });

describe("fill by rank", () => {
  it("gives assured, then queue, then filler, then nothing down the ranking", () => {
    const out = fillByRank({ ...base, ranked: [1, 2, 3, 4, 5].map((id) => ({ proposalId: id, requested: [dark(40)] })) });
    // 40 + 40 = 80 assured (the 80 % limit); 20 left of 100: the third (40) is over offered
    // (120 > 100) but within 130: filler; the fourth would make 160 > 130: nothing.
    expect(out.map((o) => o.tier)).toEqual(["assured", "assured", "filler", null, null]);
  });

  it("lets a smaller proposal further down take what the tiers above it left", () => {
    const out = fillByRank({ ...base, ranked: [{ proposalId: 1, requested: [dark(70)] }, { proposalId: 2, requested: [dark(20)] }, { proposalId: 3, requested: [dark(10)] }] });
    // 70 assured; 70 + 20 = 90 > 80 assured limit → queue (90 ≤ 100); the last 10: assured
    // 70 + 10 = 80 ≤ 80 and all tiers 90 + 10 = 100 ≤ 100 → assured again
    expect(out.map((o) => o.tier)).toEqual(["assured", "queue", "assured"]);
  });

  it("keeps later semesters' hours with the proposal without spending this semester's budget", () => {
    const out = fillByRank({ ...base, ranked: [{ proposalId: 1, requested: [dark(50), dark(60, "27B")] }, { proposalId: 2, requested: [dark(30)] }] });
    expect(out[0]).toEqual({ proposalId: 1, tier: "assured", rows: [dark(50), dark(60, "27B")] });
    expect(out[1].tier).toBe("assured");
  });

  it("gives nothing for time the call does not offer, or for a proposal that requests nothing", () => {
    const grey: Cell = { telescopeId: 1, moonCategory: "grey", semesterCode: "27A", hours: 5 };
    const out = fillByRank({ ...base, ranked: [{ proposalId: 1, requested: [grey] }, { proposalId: 2, requested: [] }] });
    expect(out.map((o) => o.tier)).toEqual([null, null]);
    expect(out.every((o) => o.rows.length === 0)).toBe(true);
  });

  it("fills around the hours the chair set by hand, counting them in their tier", () => {
    // the chair's 60 assured hours leave 20 of the assured share: the first 40 h request is queue (100 ≤ 100)
    const kept = [{ proposalId: 9, tier: "assured" as const, allocated: [dark(60)] }];
    const out = fillByRank({ ...base, kept, ranked: [1, 2].map((id) => ({ proposalId: id, requested: [dark(40)] })) });
    expect(out.map((o) => [o.proposalId, o.tier])).toEqual([[1, "queue"], [2, null]]);
    // hand-set queue hours count against offered: 70 + 35 = 105 > 100, within 130 → filler
    // (the 90 h in 27B do not count here, or 195 would leave nothing)
    const queued = fillByRank({ ...base, kept: [{ proposalId: 9, tier: "queue", allocated: [dark(70), dark(90, "27B")] }], ranked: [{ proposalId: 1, requested: [dark(35)] }] });
    expect(queued.map((o) => o.tier)).toEqual(["filler"]);
    // … but not against the assured share: 75 assured h still fit under 80
    const assuredLeft = fillByRank({ ...base, kept: [{ proposalId: 9, tier: "queue", allocated: [dark(20)] }], ranked: [{ proposalId: 1, requested: [dark(75)] }] });
    expect(assuredLeft.map((o) => o.tier)).toEqual(["assured"]);
  });
});

describe("the board's order", () => {
  it("puts moved proposals at the chair's position and keeps the rest in computed order", () => {
    const rows = [
      { proposalId: 1, computedRank: 1, chairRank: null },
      { proposalId: 2, computedRank: 2, chairRank: null },
      { proposalId: 3, computedRank: 3, chairRank: null },
      { proposalId: 4, computedRank: 4, chairRank: 1 },
      { proposalId: 5, computedRank: null, chairRank: 99 },
    ];
    expect(boardOrder(rows).map((r) => r.proposalId)).toEqual([4, 1, 2, 3, 5]);
  });
});
