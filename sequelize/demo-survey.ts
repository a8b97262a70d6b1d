// The demo's large survey: 500 invented fields in empty sky, drawn by a fixed pseudo-random
// sequence (mulberry32, seed 2027) in the sky of an A semester (RA 8.5–16.5 h, Dec −5° to +60°).
// Candidates within 1° of a Messier object, an NGC/IC object brighter than magnitude 10 or a star
// brighter than V = 5 (at their RA or at RA + 12 h, for B semesters) are skipped: SKIPPED lists
// them, found with the catalogues of the npm package d3-celestial (see
// tests/integration/demo-sky.test.ts, which checks every field against them).

function mulberry32(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export const SURVEY_SIZE = 500;

/** Candidate indexes that fall within 1° of a catalogue object. */
export const SKIPPED = new Set<number>([
  1, 5, 13, 15, 19, 26, 30, 32, 36, 38, 42, 46, 52, 61, 70, 73, 74, 76, 78, 79, 81, 88, 90, 91, 92, 95, 98, 103, 104, 113, 115, 119, 122, 125, 131, 137, 140, 144, 146, 154, 157, 160, 163, 165, 167, 169, 172, 177, 178, 182, 194, 203, 210, 211, 212, 213, 216, 219, 220, 221, 225, 232, 233, 239, 246, 250, 254, 256, 259, 261, 262, 269, 270, 271, 273, 278, 282, 284, 285, 288, 289, 292, 298, 301, 306, 311, 317, 318, 321, 322, 323, 327, 334, 337, 340, 342, 349, 350, 352, 355, 356, 358, 365, 374, 378, 384, 387, 389, 391, 396, 400, 401, 413, 416, 420, 421, 424, 439, 443, 458, 460, 463, 466, 474, 479, 483, 484, 488, 494, 497, 503, 504, 506, 517, 518, 521, 524, 526, 527, 528, 532, 533, 535, 542, 544, 552, 565, 567, 568, 573, 583, 588, 590, 595, 603, 608, 612, 615, 622, 631, 633, 638, 655
]);

export function surveyCandidates(count: number) {
  const next = mulberry32(2027);
  const out: { index: number; ra: number; dec: number; mag: number }[] = [];
  for (let index = 0; index < count; index++) {
    const ra = 127.5 + 120 * next();
    // uniform on the sphere between −5° and +60°
    const s0 = Math.sin((-5 * Math.PI) / 180);
    const s1 = Math.sin((60 * Math.PI) / 180);
    const dec = (Math.asin(s0 + (s1 - s0) * next()) * 180) / Math.PI;
    const mag = 16 + 3 * next();
    out.push({ index, ra: Math.round(ra * 1e4) / 1e4, dec: Math.round(dec * 1e4) / 1e4, mag: Math.round(mag * 10) / 10 });
  }
  return out;
}

/** The 500 fields: the candidates in order, without the skipped ones. */
export function surveyFields() {
  const fields = surveyCandidates(SURVEY_SIZE * 2).filter((c) => !SKIPPED.has(c.index)).slice(0, SURVEY_SIZE);
  return fields.map((c, i) => ({ name: `Wren Survey field ${String(i + 1).padStart(3, "0")}`, ra: c.ra, dec: c.dec, mag: c.mag, band: "R" }));
}
