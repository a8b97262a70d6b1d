import { describe, expect, it } from "vitest";
import { NIGHT_LOG_COLUMNS } from "./night-log-csv";
import { parseNightLogCsv } from "./night-log-csv.server";

// The office writes the night log's columns (fwhm, precision_mas, observed_at …); every refusal
// must name those, never the API's field names behind them.
const INTERNAL = /fwhmArcsec|precisionMas|observedAt|telescopeId|observationId|lostCause|lost\.cause/;
const ctx = {
  programmes: [{ proposalId: 1, code: "001/27A", observations: [{ observationId: 5, targetName: "Field A" }] }],
  telescopes: [{ id: 1, name: "KRO 1.0 m" }],
  existing: [],
};
const HEADER = NIGHT_LOG_COLUMNS.join(",");
const at = "2026-02-14T02:00";

function problemsOf(row: string) {
  const report = parseNightLogCsv(`${HEADER}\n${row}`, ctx);
  expect(report.error).toBeUndefined();
  const [only] = report.rows;
  if (only.ok) throw new Error(`row accepted: ${row}`);
  return only.problems;
}

describe("parseNightLogCsv's messages", () => {
  const cases: [string, string, RegExp][] = [
    [`001/27A,,${at},KRO 1.0 m,5,abc,,2.2,,`, "fwhm", /^fwhm must be a number/],
    [`001/27A,,${at},KRO 1.0 m,5,99,,2.2,,`, "fwhm", /^fwhm must be a number/],
    [`001/27A,,${at},KRO 1.0 m,5,,150,,,`, "fwhm", /^fwhm is required to derive the precision from the SNR/],
    [`001/27A,,${at},KRO 1.0 m,5,,,,,`, "precision_mas", /^precision_mas is required for an executed epoch, unless snr and fwhm are given/],
    [`001/27A,,${at},KRO 1.0 m,5,,150,2,,`, "snr", /^Give precision_mas or snr, not both/],
    [`001/27A,,${at},KRO 1.0 m,5,,x,2,,`, "snr", /^snr must be a number/],
    [`001/27A,,${at},KRO 1.0 m,5,,,x,,`, "precision_mas", /^precision_mas must be a number/],
    [`001/27A,,2099-02-14T02:00,KRO 1.0 m,5,,,2,,`, "observed_at", /^observed_at is in the future/],
    [`001/27A,,yesterday,KRO 1.0 m,5,,,2,,`, "observed_at", /^observed_at must be a date and UTC time/],
    [`001/27A,,${at},KRO 1.0 m,x,,,2,,`, "frames", /^frames must be a whole number/],
    [`001/27A,,${at},KRO 1.0 m,0,,,2,,`, "frames", /^frames must be at least 1/],
    [`001/27A,,${at},KRO 1.0 m,0,,,,aliens,`, "lost", /^lost must be weather or technical/],
    [`001/27A,,${at},KRO 1.0 m,5,,,2,,${"x".repeat(501)}`, "note", /^note must be at most 500/],
    [`001/27A,Nowhere,${at},KRO 1.0 m,5,,,2,,`, "target", /"Nowhere" is not an astrometric target/],
    [`001/27A,,${at},No scope,5,,,2,,`, "telescope", /"No scope" is not a telescope/],
  ];
  it.each(cases)("%s → %s", (row, field, message) => {
    const problems = problemsOf(row);
    expect(problems.map((p) => p.field)).toEqual([field]);
    expect(problems[0].message).toMatch(message);
  });

  it("names only the night log's own columns in every refusal", () => {
    for (const [row] of cases) {
      for (const p of problemsOf(row)) {
        expect([...NIGHT_LOG_COLUMNS, "(row)"], row).toContain(p.field);
        expect(p.message, row).not.toMatch(INTERNAL);
      }
    }
  });
});
