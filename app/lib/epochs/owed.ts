// What a lost epoch still costs (pure). A lost epoch is owed to its programme until it is made up:
// an executed epoch that fulfils no planned epoch (the office logged it on an unplanned night),
// taken after the loss, repays the earliest loss not yet repaid. An unplanned epoch taken before
// any loss is spare time, not a make-up, and repays nothing later. What is owed is a planned epoch
// not delivered: an unplanned night that was lost (a make-up attempt under cloud) adds no debt.

export type LoggedEpoch = { observedAt: number; lost: boolean; /** it fulfilled (or lost) a planned epoch */ planned: boolean };

/** `lost`: every lost record; `madeUp`: the losses repaid; `owed`: the planned epochs lost and not yet made up. */
export function lostEpochsOwed(records: LoggedEpoch[]): { lost: number; madeUp: number; owed: number } {
  let lost = 0;
  let madeUp = 0;
  let outstanding = 0;
  for (const r of [...records].sort((a, b) => a.observedAt - b.observedAt)) {
    if (r.lost) {
      lost += 1;
      if (r.planned) outstanding += 1;
    } else if (!r.planned && outstanding > 0) {
      madeUp += 1;
      outstanding -= 1;
    }
  }
  return { lost, madeUp, owed: outstanding };
}
