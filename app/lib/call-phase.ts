// The one definition of a call's phase: announced before it opens, open from its opening until
// its deadline (the deadline itself is already closed), closed after. Browser-safe; the database
// filters with the same bounds are in call-phase.server.ts.

export type CallPhase = "announced" | "open" | "closed";

type Moments = { opensAt: Date | string; deadlineAt: Date | string };
const ms = (at: Date | string) => (typeof at === "string" ? Date.parse(at) : at.getTime());

export function deadlinePassed(call: Pick<Moments, "deadlineAt">, now: Date | string = new Date()): boolean {
  return ms(now) >= ms(call.deadlineAt);
}

export function callPhase(call: Moments, now: Date | string = new Date()): CallPhase {
  if (deadlinePassed(call, now)) return "closed";
  return ms(now) >= ms(call.opensAt) ? "open" : "announced";
}
