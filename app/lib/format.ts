// The one way numbers are written on the pages and in the PDFs: a known number with a fixed
// number of decimals, and one mark, NONE, where a number is not known (null, undefined, NaN or
// infinite). Browser-safe, no imports.

/** What stands where a number is not known (an em dash). */
export const NONE = "—";

type MaybeNumber = number | null | undefined;

export function isKnown(x: MaybeNumber): x is number {
  return typeof x === "number" && Number.isFinite(x);
}

/** `x` with `digits` decimals ("12.50"), or NONE. */
export function fixed(x: MaybeNumber, digits = 1): string {
  return isKnown(x) ? x.toFixed(digits) : NONE;
}

/** A known `x` with `digits` decimals, a value that rounds to zero shown as zero ("0.000", not "-0.000"). */
export function fixedNoMinusZero(x: number, digits: number): string {
  return x.toFixed(digits).replace(/^-(0\.?0*)$/, "$1");
}

/** Hours with their unit ("12.5 h"), or NONE. */
export function hours(x: MaybeNumber, digits = 1): string {
  return isKnown(x) ? `${x.toFixed(digits)} h` : NONE;
}

/** A fraction as a percentage (0.125 → "13 %" with 0 digits), or NONE. */
export function percent(x: MaybeNumber, digits = 0): string {
  return isKnown(x) ? `${(x * 100).toFixed(digits)} %` : NONE;
}

/** `x` with thousands grouped and exactly `digits` decimals ("12,345.60"), never "-0", or NONE. */
export function grouped(x: MaybeNumber, digits = 2): string {
  if (!isKnown(x)) return NONE;
  const text = x.toLocaleString("en-GB", { maximumFractionDigits: digits, minimumFractionDigits: digits });
  // a value that rounds to zero is shown as zero
  return /^-0(\.0*)?$/.test(text) ? text.slice(1) : text;
}

/** An instant as "YYYY-MM-DD HH:MM UTC". */
export function formatUtc(instant: Date | string): string {
  return `${new Date(instant).toISOString().slice(0, 16).replace("T", " ")} UTC`;
}
