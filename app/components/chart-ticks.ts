// Explicit, regular axis ticks for the charts (recharts' own choice is irregular on time axes).

export const ALTITUDE_TICKS = [0, 15, 30, 45, 60, 75, 90];
export const PARALLAX_FACTOR_TICKS = [-1, -0.5, 0, 0.5, 1];

const HOUR = 3_600_000;

/** Whole UTC hours inside [first, last], every 1, 2 or 3 h so that there are at most `max` ticks. */
export function wholeHourTicks(first: number, last: number, max = 8): number[] {
  if (!(last > first)) return [];
  const span = (last - first) / HOUR;
  const step = [1, 2, 3, 4, 6].find((s) => span / s <= max) ?? 6;
  const ticks: number[] = [];
  // start on a whole hour that is a multiple of the step in UTC, so ticks read 20:00, 22:00, …
  let t = Math.ceil(first / (step * HOUR)) * step * HOUR;
  for (; t <= last; t += step * HOUR) ticks.push(t);
  return ticks;
}

/** First days of January and July (or of every year on long spans) inside [first, last]. */
export function halfYearTicks(first: number, last: number, max = 10): number[] {
  if (!(last > first)) return [];
  const months = (last - first) / (30.44 * 24 * HOUR);
  const stepMonths = months / 6 <= max ? 6 : 12;
  const start = new Date(first);
  const ticks: number[] = [];
  for (let y = start.getUTCFullYear(), m = 0; ; m += stepMonths) {
    const t = Date.UTC(y, m, 1);
    if (t > last) break;
    if (t >= first) ticks.push(t);
  }
  return ticks;
}
