// Relative optical air mass.
//
// Product default: Kasten & Young (1989), Applied Optics 28, 4735:
//   X = 1 / (cos z + 0.50572 (96.07995° − z)^−1.6364),  z in degrees.
// It is fitted to the tabulated air masses of the ISO standard atmosphere and stays finite
// at the horizon (≈ 38). We feed it the geometric (unrefracted) altitude, the same altitude
// that the visibility limits use; near the zenith the difference is nil, at X = 3 it is ~1 %.
// Pickering (2002), DIO 12, 1, with the apparent altitude h in degrees, is offered for comparison:
//   X = 1 / sin(h + 244 / (165 + 47 h^1.1)).

const DEG = Math.PI / 180;

export const AIRMASS_FORMULA = "Kasten & Young (1989)";

export function airmassKastenYoung(altitudeDeg: number): number {
  if (!(altitudeDeg >= 0 && altitudeDeg <= 90)) return Number.POSITIVE_INFINITY;
  const z = 90 - altitudeDeg;
  return 1 / (Math.cos(z * DEG) + 0.50572 * Math.pow(96.07995 - z, -1.6364));
}

export function airmassPickering(apparentAltitudeDeg: number): number {
  const h = apparentAltitudeDeg;
  if (!(h >= 0 && h <= 90)) return Number.POSITIVE_INFINITY;
  return 1 / Math.sin((h + 244 / (165 + 47 * Math.pow(h, 1.1))) * DEG);
}

/** Air mass at an altitude (degrees), Kasten & Young (1989). Infinity below the horizon. */
export function airmass(altitudeDeg: number): number {
  return airmassKastenYoung(altitudeDeg);
}

/**
 * Altitude (degrees) at which the air mass equals `x` (≥ 1), inverting Kasten & Young by
 * bisection: X(h) is monotone on [0°, 90°]. Values below the formula's zenith value (0.9997)
 * give 90°; values above its horizon value give 0°.
 */
export function altitudeForAirmass(x: number): number {
  if (!Number.isFinite(x) || x <= airmass(90)) return 90;
  if (x >= airmass(0)) return 0;
  let lo = 0;
  let hi = 90;
  for (let i = 0; i < 60; i++) {
    const mid = (lo + hi) / 2;
    if (airmass(mid) > x) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}
