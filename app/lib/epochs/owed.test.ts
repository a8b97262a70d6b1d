import { describe, expect, it } from "vitest";
import { lostEpochsOwed, type LoggedEpoch } from "./owed";

const day = (d: number) => Date.UTC(2026, 0, d);
const executed = (d: number, planned = true): LoggedEpoch => ({ observedAt: day(d), lost: false, planned });
const lost = (d: number): LoggedEpoch => ({ observedAt: day(d), lost: true, planned: true });

describe("lostEpochsOwed", () => {
  it("owes every loss while nothing has made it up", () => {
    expect(lostEpochsOwed([executed(1), lost(10), lost(20)])).toEqual({ lost: 2, madeUp: 0, owed: 2 });
  });

  it("repays a loss with an unplanned epoch taken after it, the earliest loss first", () => {
    expect(lostEpochsOwed([executed(1), lost(10), executed(13, false), lost(20)])).toEqual({ lost: 2, madeUp: 1, owed: 1 });
    expect(lostEpochsOwed([lost(20), executed(25, false), lost(10), executed(13, false)])).toEqual({ lost: 2, madeUp: 2, owed: 0 });
  });

  it("takes neither a planned epoch nor spare time before the loss as its make-up", () => {
    expect(lostEpochsOwed([executed(3, false), lost(10), executed(40)])).toEqual({ lost: 1, madeUp: 0, owed: 1 });
  });

  it("repays one loss per make-up, however many unplanned epochs follow", () => {
    expect(lostEpochsOwed([lost(10), executed(12, false), executed(14, false), executed(16, false)])).toEqual({ lost: 1, madeUp: 1, owed: 0 });
  });

  it("adds no debt for a lost make-up attempt: the planned epoch lost is owed once", () => {
    const attempt: LoggedEpoch = { observedAt: day(13), lost: true, planned: false };
    expect(lostEpochsOwed([lost(10), attempt])).toEqual({ lost: 2, madeUp: 0, owed: 1 });
    expect(lostEpochsOwed([lost(10), attempt, executed(16, false)])).toEqual({ lost: 2, madeUp: 1, owed: 0 });
  });
});
