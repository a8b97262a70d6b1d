// Parsing and formatting of ICRS/J2000 coordinates, and proper motion carried to a date.

export type ParseResult = { ok: true; value: number } | { ok: false; message: string };

export const DEG = Math.PI / 180;
const MAS_TO_RAD = DEG / 3.6e6;
export const JULIAN_YEAR_DAYS = 365.25;
/** J2000.0 = 2000-01-01T12:00 TT; the 64 s between TT and UTC are far below anything we resolve. */
export const J2000_MS = Date.UTC(2000, 0, 1, 12, 0, 0);

function splitSexagesimal(text: string): { sign: number; signed: boolean; parts: number[] } | null {
  let t = text.trim().replace(/^[−–]/, "-");
  let sign = 1;
  const signed = t.startsWith("+") || t.startsWith("-");
  if (signed) {
    sign = t.startsWith("-") ? -1 : 1;
    t = t.slice(1).trim();
  }
  const cleaned = t.replace(/[hdº°:'′m"″s]/gi, " ").trim();
  const parts = cleaned.split(/\s+/);
  if (parts.length > 3) return null;
  if (!parts.every((p) => /^\d+(\.\d+)?$/.test(p))) return null;
  if (parts.slice(0, -1).some((p) => p.includes("."))) return null;
  return { sign, signed, parts: parts.map(Number) };
}

function isDecimal(text: string): boolean {
  return /^[+-]?\d+(\.\d*)?$|^[+-]?\.\d+$/.test(text.trim());
}

/** Right ascension: `hh:mm:ss.s`, `hh mm ss.s`, `16h23m35s`, or decimal degrees. Returns degrees. */
export function parseRa(input: string | number, field = "ra"): ParseResult {
  if (typeof input === "number") return checkRa(input, field);
  const text = input.trim();
  if (text === "") return { ok: false, message: `${field}: required` };
  if (isDecimal(text)) return checkRa(Number(text), field);
  const s = splitSexagesimal(text);
  if (!s || s.signed) {
    return { ok: false, message: `${field}: not a right ascension (use hh:mm:ss.s, "16h23m35s" or decimal degrees)` };
  }
  const [h, m = 0, sec = 0] = s.parts;
  if (!Number.isInteger(h) || h > 23) return { ok: false, message: `${field}: hours must be 0–23` };
  if (m >= 60) return { ok: false, message: `${field}: minutes must be 0–59` };
  if (sec >= 60) return { ok: false, message: `${field}: seconds must be 0–59.999` };
  return { ok: true, value: 15 * (h + m / 60 + sec / 3600) };
}

function checkRa(deg: number, field: string): ParseResult {
  if (!Number.isFinite(deg) || deg < 0 || deg >= 360) {
    return { ok: false, message: `${field}: must be in the range 0 ≤ RA < 360 degrees (0h–24h)` };
  }
  return { ok: true, value: deg };
}

/** Declination: `±dd:mm:ss.s`, `±dd mm ss`, `-12d34m56s`, or decimal degrees. Returns degrees. */
export function parseDec(input: string | number, field = "dec"): ParseResult {
  if (typeof input === "number") return checkDec(input, field);
  const text = input.trim();
  if (text === "") return { ok: false, message: `${field}: required` };
  if (isDecimal(text)) return checkDec(Number(text), field);
  const s = splitSexagesimal(text);
  if (!s) return { ok: false, message: `${field}: not a declination (use ±dd:mm:ss.s or decimal degrees)` };
  const [d, m = 0, sec = 0] = s.parts;
  if (m >= 60) return { ok: false, message: `${field}: arcminutes must be 0–59` };
  if (sec >= 60) return { ok: false, message: `${field}: arcseconds must be 0–59.999` };
  return checkDec(s.sign * (d + m / 60 + sec / 3600), field);
}

function checkDec(deg: number, field: string): ParseResult {
  if (!Number.isFinite(deg) || deg < -90 || deg > 90) {
    return { ok: false, message: `${field}: must be in the range −90 ≤ Dec ≤ +90 degrees` };
  }
  return { ok: true, value: deg };
}

function sexagesimal(value: number, secondDecimals: number): [number, number, string] {
  const scale = 10 ** secondDecimals;
  let totalUnits = Math.round(value * 3600 * scale);
  const a = Math.floor(totalUnits / (3600 * scale));
  totalUnits -= a * 3600 * scale;
  const b = Math.floor(totalUnits / (60 * scale));
  const c = (totalUnits - b * 60 * scale) / scale;
  const cText = c.toFixed(secondDecimals).padStart(secondDecimals > 0 ? 3 + secondDecimals : 2, "0");
  return [a, b, cText];
}

/** Degrees → `hh:mm:ss.ss`. */
export function formatRa(deg: number, secondDecimals = 2): string {
  const hours = (((deg % 360) + 360) % 360) / 15;
  const [h, m, s] = sexagesimal(hours, secondDecimals);
  return `${String(h % 24).padStart(2, "0")}:${String(m).padStart(2, "0")}:${s}`;
}

/** Degrees → `±dd:mm:ss.s`. */
export function formatDec(deg: number, secondDecimals = 1): string {
  const [d, m, s] = sexagesimal(Math.abs(deg), secondDecimals);
  return `${deg < 0 ? "-" : "+"}${String(d).padStart(2, "0")}:${String(m).padStart(2, "0")}:${s}`;
}

export type Target = {
  raDeg: number;
  decDeg: number;
  /** μα* = μα·cos δ, mas/yr */
  pmRaCosDecMasPerYr?: number;
  /** μδ, mas/yr */
  pmDecMasPerYr?: number;
  /** Epoch of the position, ms since 1970 (UTC); J2000.0 when omitted. */
  epochMs?: number;
};

export type Vec3 = [number, number, number];

export function unitVector(raDeg: number, decDeg: number): Vec3 {
  const a = raDeg * DEG;
  const d = decDeg * DEG;
  return [Math.cos(d) * Math.cos(a), Math.cos(d) * Math.sin(a), Math.sin(d)];
}

export function toRaDec(v: Vec3): { raDeg: number; decDeg: number } {
  const r = Math.hypot(v[0], v[1], v[2]);
  let ra = Math.atan2(v[1], v[0]) / DEG;
  if (ra < 0) ra += 360;
  return { raDeg: ra, decDeg: Math.asin(v[2] / r) / DEG };
}

/**
 * Direction (ICRS, unit vector) at a date, moving the star linearly on the tangent plane:
 * u(t) = u0 + Δt (μα* p + μδ q), normalised, with p, q the local east and north unit vectors.
 * Radial velocity and perspective acceleration are neglected (well below 1 mas for decades
 * except for the nearest, fastest stars).
 */
export function directionAt(target: Target, dateMs: number): Vec3 {
  const u = unitVector(target.raDeg, target.decDeg);
  const pa = target.pmRaCosDecMasPerYr ?? 0;
  const pd = target.pmDecMasPerYr ?? 0;
  if (pa === 0 && pd === 0) return u;
  const years = (dateMs - (target.epochMs ?? J2000_MS)) / (86400e3 * JULIAN_YEAR_DAYS);
  const a = target.raDeg * DEG;
  const d = target.decDeg * DEG;
  const p: Vec3 = [-Math.sin(a), Math.cos(a), 0];
  const q: Vec3 = [-Math.sin(d) * Math.cos(a), -Math.sin(d) * Math.sin(a), Math.cos(d)];
  const ea = pa * MAS_TO_RAD * years;
  const ed = pd * MAS_TO_RAD * years;
  const v: Vec3 = [u[0] + ea * p[0] + ed * q[0], u[1] + ea * p[1] + ed * q[1], u[2] + ea * p[2] + ed * q[2]];
  const n = Math.hypot(v[0], v[1], v[2]);
  return [v[0] / n, v[1] / n, v[2] / n];
}

/** Position (degrees) carried to a date by its proper motion. */
export function positionAt(target: Target, dateMs: number): { raDeg: number; decDeg: number } {
  return toRaDec(directionAt(target, dateMs));
}

/** Great-circle separation in degrees (vector form; stable at small and large angles). */
export function angularSeparationDeg(ra1: number, dec1: number, ra2: number, dec2: number): number {
  const a = unitVector(ra1, dec1);
  const b = unitVector(ra2, dec2);
  return vectorSeparationDeg(a, b);
}

export function vectorSeparationDeg(a: Vec3, b: Vec3): number {
  const cx = a[1] * b[2] - a[2] * b[1];
  const cy = a[2] * b[0] - a[0] * b[2];
  const cz = a[0] * b[1] - a[1] * b[0];
  const dot = a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
  return Math.atan2(Math.hypot(cx, cy, cz), dot) / DEG;
}

/**
 * Horizontal coordinates from latitude, local hour angle and declination (degrees); azimuth
 * measured from north through east (Meeus measures from south: add 180°).
 */
export function horizontalFromHourAngle(latDeg: number, hourAngleDeg: number, decDeg: number): { altitudeDeg: number; azimuthDeg: number } {
  const phi = latDeg * DEG;
  const H = hourAngleDeg * DEG;
  const d = decDeg * DEG;
  const alt = Math.asin(Math.sin(phi) * Math.sin(d) + Math.cos(phi) * Math.cos(d) * Math.cos(H));
  const azSouth = Math.atan2(Math.sin(H), Math.cos(H) * Math.sin(phi) - Math.tan(d) * Math.cos(phi));
  let az = azSouth / DEG + 180;
  if (az >= 360) az -= 360;
  return { altitudeDeg: alt / DEG, azimuthDeg: az };
}
