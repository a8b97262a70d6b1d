// The proposal PDF's technical pages: the feasibility sheet's tables, with the numbers behind
// its charts.

import { formatDec, formatRa } from "~/lib/astro/coordinates";
import { fixed as f, fixedNoMinusZero as f0 } from "~/lib/format";
import type { FeasibilitySheet } from "~/lib/proposals/feasibility";
import { AMBER, GREY, RED, type Writer } from "./pdf-writer.server";

/** Total rows of the requested-time tables: the call's semester first, each later one, then all together. */
export function semesterTotals(sheet: FeasibilitySheet): [string, string, string][] {
  const rows = sheet.requestedHoursBySemester.map((s): [string, string, string] => [s.semesterCode, s.callSemester ? "Total, call's semester" : "Total, later semester", f(s.hours, 2)]);
  return rows.length > 1 ? [...rows, ["", "All semesters together", f(sheet.requestedHours, 2)]] : rows;
}

const big = (x: number) => (x >= 1e5 ? x.toExponential(2) : Math.round(x).toString());

export function technicalPages(w: Writer, sheet: FeasibilitySheet) {
  w.newPage();
  w.heading(`Technical case: feasibility sheet for ${sheet.semesterCode}`);
  w.paragraph(
    `Computed ${sheet.computedAt.slice(0, 16).replace("T", " ")} UTC for the semester ${sheet.semesterStart} to ${sheet.semesterEnd}. ` +
      `Darkness: Sun below ${sheet.conventions.twilightAltitudeDeg}°. ${sheet.conventions.moonTimeRule} ` +
      `Airmass: ${sheet.conventions.airmassFormula}. Refraction: ${sheet.conventions.refraction}. Exposure: ${sheet.conventions.exposure}. Astrometry: ${sheet.conventions.centroid}. Time per epoch: ${sheet.conventions.timePerEpoch}.`,
    8.5,
    { color: GREY },
  );

  w.heading("Problems", 11);
  if (!sheet.problems.length) w.paragraph("None: nothing blocks this proposal.", 9.5);
  for (const p of sheet.problems) {
    w.paragraph(`${p.severity === "blocking" ? "BLOCKING" : "warning"} · ${p.message}`, 9, { color: p.severity === "blocking" ? RED : AMBER, gap: 1 });
  }

  w.heading("Targets", 11, w.tableLead(sheet.targets.length));
  w.table(
    [
      { label: "Target", width: 0.3 },
      { label: "RA (J2000)", width: 0.15 },
      { label: "Dec (J2000)", width: 0.15 },
      { label: "μα* (mas/yr)", width: 0.13, right: true },
      { label: "μδ (mas/yr)", width: 0.13, right: true },
      { label: "Magnitude", width: 0.14, right: true },
    ],
    sheet.targets.map((t) => [t.name, formatRa(t.raDeg, 2), formatDec(t.decDeg, 1), f(t.pmRaMasPerYr, 2), f(t.pmDecMasPerYr, 2), Object.entries(t.magnitudes ?? {}).map(([b, m]) => `${b} ${m}`).join(", ") || "—"]),
  );

  w.heading("Visibility (observable hours above the airmass limit, in astronomical darkness)", 11, w.tableLead(sheet.observations.length));
  w.table(
    [
      { label: "Target", width: 0.2 },
      { label: "Telescope · band", width: 0.15 },
      { label: "Moon · X max", width: 0.11 },
      { label: "Total", width: 0.08, right: true },
      { label: "Dark", width: 0.07, right: true },
      { label: "Grey", width: 0.07, right: true },
      { label: "Bright", width: 0.07, right: true },
      { label: "Usable (n)", width: 0.11, right: true },
      { label: "Best months", width: 0.14 },
    ],
    sheet.observations.map((o) => [
      o.targetName,
      `${o.telescopeName} · ${o.band}`,
      `${o.moonCategory} · ${o.maxAirmass}`,
      f(o.visibility.observableHours),
      f(o.visibility.byMoonCategory.dark),
      f(o.visibility.byMoonCategory.grey),
      f(o.visibility.byMoonCategory.bright),
      `${f(o.visibility.usableHours)} (${o.visibility.usableNights})`,
      o.visibility.bestMonths.map((m) => m.month.slice(5)).join(", ") || "—",
    ]),
  );

  // The numbers behind the hours-per-night chart, summed by month.
  const months = [...new Set(Object.values(sheet.sites).flatMap((s) => s.nights.map((n) => n.date.slice(0, 7))))].sort();
  if (sheet.observations.length && months.length) {
    w.heading("Hours per night, summed by month (the chart's numbers)", 11, w.tableLead(sheet.observations.length));
    const share = 0.75 / months.length;
    w.table(
      [{ label: "Target · band", width: 0.25 }, ...months.map((m) => ({ label: m, width: share, right: true }))],
      sheet.observations.map((o) => {
        const nights = sheet.sites[o.telescopeId]?.nights ?? [];
        const byMonth = new Map<string, number>();
        nights.forEach((n, i) => byMonth.set(n.date.slice(0, 7), (byMonth.get(n.date.slice(0, 7)) ?? 0) + (o.visibility.hoursPerNight[i] ?? 0)));
        return [`${o.targetName} · ${o.band}`, ...months.map((m) => f(byMonth.get(m) ?? 0))];
      }),
    );
  }

  w.heading("Exposure and signal-to-noise per frame, with the noise breakdown (variances in e⁻²)", 11, w.tableLead(sheet.observations.length));
  w.table(
    [
      { label: "Target · band", width: 0.19 },
      { label: "Exp (s)", width: 0.07, right: true },
      { label: "SNR", width: 0.06, right: true },
      { label: "X", width: 0.05, right: true },
      { label: "Source", width: 0.09, right: true },
      { label: "Sky", width: 0.09, right: true },
      { label: "Dark", width: 0.08, right: true },
      { label: "Read", width: 0.08, right: true },
      { label: "n_pix", width: 0.06, right: true },
      { label: "Peak/full well", width: 0.12, right: true },
      { label: "Regime", width: 0.11 },
    ],
    sheet.observations.map((o) => {
      const x = o.exposure;
      if (!x) return [`${o.targetName} · ${o.band}`, "—", "—", "—", "—", "—", "—", "—", "—", "—", "not computed"];
      return [
        `${o.targetName} · ${o.band}`,
        f(x.exposureSeconds, 1),
        f(x.snr, 1),
        f(x.airmass, 2),
        big(x.noise.source),
        big(x.noise.sky),
        big(x.noise.dark),
        big(x.noise.read),
        f(x.pixels, 1),
        `${f((100 * x.peakAtBestAirmassElectrons) / x.fullWellE, 0)} %${x.saturated ? " SAT" : ""}`,
        x.regime.replace("-limited", ""),
      ];
    }),
  );

  w.heading("Time per epoch and time requested", 11, w.tableLead(sheet.observations.length));
  w.table(
    [
      { label: "Target · band", width: 0.24 },
      { label: "Frames", width: 0.08, right: true },
      { label: "Exposure (s)", width: 0.11, right: true },
      { label: "Readout (s)", width: 0.1, right: true },
      { label: "Acquisition (s)", width: 0.12, right: true },
      { label: "Per epoch (s)", width: 0.11, right: true },
      { label: `Epochs ${sheet.semesterCode}`, width: 0.12, right: true },
      { label: "Hours", width: 0.12, right: true },
    ],
    sheet.observations.map((o) => [
      `${o.targetName} · ${o.band}`,
      String(o.timePerEpoch.frames),
      f(o.timePerEpoch.exposureSeconds, 1),
      f(o.timePerEpoch.readoutSeconds, 0),
      f(o.timePerEpoch.acquisitionSeconds, 0),
      f(o.timePerEpoch.totalSeconds, 0),
      String(o.epochsThisSemester),
      f(o.requestedHoursThisSemester, 2),
    ]),
  );

  w.heading("Requested hours per telescope, moon category and semester", 11, w.tableLead(sheet.totals.length + 1));
  w.table(
    [
      { label: "Semester", width: 0.15 },
      { label: "Telescope", width: 0.3 },
      { label: "Moon category", width: 0.2 },
      { label: "Requested (h)", width: 0.17, right: true },
      { label: "Offered (h)", width: 0.18, right: true },
    ],
    [
      ...sheet.totals.map((t) => [t.semesterCode, t.telescopeName, t.moonCategory, f(t.hours, 2), t.offeredHours === null ? "—" : f(t.offeredHours, 0)]),
      ...semesterTotals(sheet).map(([semester, label, hours]) => [semester, label, "", hours, ""]),
    ],
  );

  const astrometric = sheet.observations.filter((o) => o.astrometry);
  if (astrometric.length) {
    w.heading("Astrometric epochs and the precision they reach", 11, w.tableLead(astrometric.length));
    w.table(
      [
        { label: "Target · band", width: 0.22 },
        { label: "Years", width: 0.1, right: true },
        { label: "Epochs", width: 0.08, right: true },
        { label: "σ epoch (mas)", width: 0.12, right: true },
        { label: "σμ reached (mas/yr)", width: 0.18, right: true },
        { label: "required", width: 0.1, right: true },
        { label: "σϖ (mas)", width: 0.1, right: true },
        { label: "Plan", width: 0.1 },
      ],
      astrometric.map((o) => {
        const a = o.astrometry!;
        return [
          `${o.targetName} · ${o.band}`,
          f(a.baselineYears, 1),
          String(a.epochs.length),
          f(a.perEpochPrecisionMas, 2),
          a.properMotionPrecisionMasPerYr ? `${f(a.properMotionPrecisionMasPerYr.ra, 3)} / ${f(a.properMotionPrecisionMasPerYr.dec, 3)}` : "—",
          a.requiredPmPrecisionMasPerYr === null ? "—" : `${a.requiredPmPrecisionMasPerYr}${a.met ? " met" : " NOT met"}`,
          f(a.parallaxPrecisionMas, 3),
          a.source,
        ];
      }),
    );
    for (const o of astrometric) {
      const a = o.astrometry!;
      // the bold caption stays with its table's header and first rows
      w.ensure(9.5 * 1.35 * 2 + 2 + w.tableLead(a.epochs.length));
      w.paragraph(`${o.targetName} · ${o.band}: epochs and their parallax factors (the parallax-factor chart's points)`, 9.5, { bold: true, gap: 2 });
      w.table(
        [
          { label: "Night of", width: 0.18 },
          { label: "Semester", width: 0.14 },
          { label: "f(α*)", width: 0.14, right: true },
          { label: "f(δ)", width: 0.14, right: true },
          { label: "Observable (h)", width: 0.18, right: true },
          { label: "Status", width: 0.22 },
        ],
        a.epochs.map((e) => [e.date, e.semesterCode, f0(e.parallaxFactorRa, 3), f0(e.parallaxFactorDec, 3), f(e.observableHours, 2), e.inWindow === false ? "outside window" : e.fragile ? `${e.status}, fragile` : e.status]),
      );
    }
  }
}
