import { describe, expect, it } from "vitest";
import { runningTotals } from "./running-totals";

// Hand-built: 100 dark hours and 40 grey hours offered on telescope 1; assured share 80 %,
// filler margin 30 % (the defaults). The expected numbers are worked out in the comments.
const offered = [
  { telescopeId: 1, moonCategory: "dark" as const, hours: 100 },
  { telescopeId: 1, moonCategory: "grey" as const, hours: 40 },
];
const dark = (hours: number) => ({ telescopeId: 1, moonCategory: "dark" as const, hours });
const grey = (hours: number) => ({ telescopeId: 1, moonCategory: "grey" as const, hours });

describe("running totals down the ranked list", () => {
  it("adds up each telescope × moon category row by row and marks where offered runs out", () => {
    const { cells, warnings } = runningTotals({
      offered,
      assuredShareLimit: 0.8,
      fillerMargin: 0.3,
      rows: [
        { proposalId: 11, tier: "assured", cells: [dark(40), grey(10)] },
        { proposalId: 12, tier: "queue", cells: [dark(50)] },
        { proposalId: 13, tier: "filler", cells: [dark(20)] }, // 40 + 50 + 20 = 110 > 100: the line falls here
        { proposalId: 14, tier: null, cells: [] },
      ],
    });
    const darkCell = cells.find((c) => c.moonCategory === "dark")!;
    expect(darkCell.runningHours).toEqual([40, 90, 110, 110]);
    expect(darkCell.firstRowOver).toBe(2);
    expect(darkCell.assuredHours).toBe(40);
    expect(darkCell.allLimit).toBeCloseTo(130, 9); // 100 × 1.3
    const greyCell = cells.find((c) => c.moonCategory === "grey")!;
    expect(greyCell.runningHours).toEqual([10, 10, 10, 10]);
    expect(greyCell.firstRowOver).toBeNull();
    // 110 ≤ 130 and 40 ≤ 80: no warning yet
    expect(warnings).toEqual([]);
  });

  it("warns when assured passes its share of offered and when all tiers pass offered + margin", () => {
    const { warnings } = runningTotals({
      offered,
      assuredShareLimit: 0.8,
      fillerMargin: 0.3,
      rows: [
        { proposalId: 1, tier: "assured", cells: [dark(85)] }, // 85 > 80 assured
        { proposalId: 2, tier: "filler", cells: [dark(50)] }, // 135 > 130
      ],
    });
    expect(warnings).toEqual([
      { telescopeId: 1, moonCategory: "dark", kind: "assured-share", hours: 85, limit: 80 },
      { telescopeId: 1, moonCategory: "dark", kind: "over-margin", hours: 135, limit: 130 },
    ]);
  });

  it("keeps exactly-at-the-limit allocations free of warnings, and reports hours on cells not offered", () => {
    const { warnings, unoffered } = runningTotals({
      offered,
      assuredShareLimit: 0.8,
      fillerMargin: 0.3,
      rows: [
        { proposalId: 1, tier: "assured", cells: [dark(80)] },
        { proposalId: 2, tier: "filler", cells: [dark(50), { telescopeId: 2, moonCategory: "bright", hours: 3 }] },
      ],
    });
    expect(warnings).toEqual([]);
    expect(unoffered).toEqual([{ proposalId: 2, telescopeId: 2, moonCategory: "bright", hours: 3 }]);
  });
});
