// The proposal PDF: a cover, technical pages (the feasibility sheet's tables, with the numbers
// behind its charts) and the uploaded science case, with a header and page numbers throughout.
// Set in Source Sans 3 from the @fontsource package that ships with the app (WOFF, unpacked to
// TrueType once per process, embedded and subset by pdf-lib with @pdf-lib/fontkit). Speed: every
// string is laid out (OpenType shaping) once per embedded font, not for every width check and draw.
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import fontkit from "@pdf-lib/fontkit";
import { PDFDocument, rgb, type PDFFont, type PDFPage } from "pdf-lib";
import { formatDec, formatRa } from "~/lib/astro/coordinates";
import { fixed as f, fixedNoMinusZero as f0 } from "~/lib/format";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import type { FeasibilitySheet } from "~/lib/proposals/feasibility";
import { scienceCategoryLabel } from "~/lib/proposals/vocabulary";
import { latestScienceCaseBytes } from "~/lib/proposals/science-case.server";
import { Call, Proposal, ProposalMember, User } from "~/models/index.server";
import { proposalStatusLabels } from "~/lib/domain";
import { woffToSfnt } from "~/lib/proposals/woff";
import { breaksBefore, headingHeight, linesLeadHeight, tableLeadHeight } from "~/lib/proposals/pdf-layout";

export const A4: [number, number] = [595.28, 841.89];
export const MARGIN = 50;
export const INK = rgb(0.075, 0.13, 0.23);
export const GREY = rgb(0.4, 0.45, 0.52);
const RED = rgb(0.6, 0.1, 0.1);
const AMBER = rgb(0.55, 0.35, 0.02);
export const RULE = rgb(0.8, 0.83, 0.87);

type FontFace = { pdf: PDFFont; has: (cp: number) => boolean };
type Family = FontFace[];

/** Total rows of the requested-time tables: the call's semester first, each later one, then all together. */
function semesterTotals(sheet: FeasibilitySheet): [string, string, string][] {
  const rows = sheet.requestedHoursBySemester.map((s): [string, string, string] => [s.semesterCode, s.callSemester ? "Total, call's semester" : "Total, later semester", f(s.hours, 2)]);
  return rows.length > 1 ? [...rows, ["", "All semesters together", f(sheet.requestedHours, 2)]] : rows;
}

type Glyph = { id: number; codePoints: number[] };
type Layout = { glyphs: Glyph[]; positions: unknown[] };
type FontkitFont = { hasGlyphForCodePoint(cp: number): boolean; layout(text: string, features?: unknown): Layout; getGlyph(id: number, codePoints?: number[]): Glyph };
type LoadedFont = { bytes: Uint8Array; layout: (text: string) => Layout; has: (cp: number) => boolean };
const LAYOUTS_PER_FONT = 50_000;

/**
 * One parsed font per face for the whole process, used only to lay strings out (OpenType
 * shaping, which pdf-lib runs for every width and every draw): each string's layout is
 * remembered, up to LAYOUTS_PER_FONT strings. Each document still embeds its own instance, whose
 * glyphs (and so the subset and the text mapping) are its own.
 */
function loadFont(bytes: Uint8Array): LoadedFont {
  const font = fontkit.create(bytes as unknown as Buffer) as unknown as FontkitFont;
  const seen = new Map<string, Layout>();
  const known = new Map<number, boolean>();
  return {
    bytes,
    layout: (text) => {
      let run = seen.get(text);
      if (!run) {
        if (seen.size >= LAYOUTS_PER_FONT) seen.clear();
        seen.set(text, (run = font.layout(text)));
      }
      return run;
    },
    has: (cp) => {
      let v = known.get(cp);
      if (v === undefined) known.set(cp, (v = font.hasGlyphForCodePoint(cp)));
      return v;
    },
  };
}

let fontFiles: Record<string, LoadedFont> | null = null;
/** The six faces, unpacked and parsed once per process. */
function fonts() {
  if (!fontFiles) {
    const dir = path.join(path.dirname(createRequire(import.meta.url).resolve("@fontsource/source-sans-3/LICENSE")), "files");
    const load = (name: string) => loadFont(woffToSfnt(new Uint8Array(readFileSync(path.join(dir, `source-sans-3-${name}-normal.woff`)))));
    fontFiles = {
      regular: load("latin-400"),
      regularExt: load("latin-ext-400"),
      regularGreek: load("greek-400"),
      bold: load("latin-600"),
      boldExt: load("latin-ext-600"),
      boldGreek: load("greek-600"),
    };
  }
  return fontFiles;
}

/** The document's font lays out through the shared layouts, with its own glyph objects. */
function useSharedLayouts(pdf: PDFFont, shared: LoadedFont) {
  const own = (pdf as unknown as { embedder: { font: FontkitFont } }).embedder.font;
  const mine = new Map<string, Layout>();
  own.layout = (text) => {
    let run = mine.get(text);
    if (!run) {
      const s = shared.layout(text);
      mine.set(text, (run = { glyphs: s.glyphs.map((g) => own.getGlyph(g.id, g.codePoints)), positions: s.positions }));
    }
    return run;
  };
}

async function family(doc: PDFDocument, names: string[]): Promise<Family> {
  const loaded = fonts();
  const out: Family = [];
  for (const name of names) {
    const face = loaded[name];
    const pdf = await doc.embedFont(face.bytes, { subset: true });
    useSharedLayouts(pdf, face);
    out.push({ pdf, has: face.has });
  }
  return out;
}

const FALLBACK: Record<string, string> = { "≈": "~", "ϖ": "plx", "⁻": "-", "≤": "<=", "≥": ">=", "√": "sqrt ", "→": "->", "…": "...", "·": "·" };

type Run = { text: string; font: PDFFont };
const runCache = new WeakMap<Family, Map<string, Run[]>>();

/** Splits text into runs, each set in the first face of the family that has its glyphs. */
function runs(text: string, fam: Family): Run[] {
  let cache = runCache.get(fam);
  if (!cache) runCache.set(fam, (cache = new Map()));
  let out = cache.get(text);
  if (!out) cache.set(text, (out = splitRuns(text, fam)));
  return out;
}

function splitRuns(text: string, fam: Family): Run[] {
  const out: { text: string; font: PDFFont }[] = [];
  for (const ch of text) {
    const cp = ch.codePointAt(0)!;
    let face = fam.find((f) => f.has(cp));
    let t = ch;
    if (!face) {
      t = FALLBACK[ch] ?? "?";
      face = fam[0];
    }
    const last = out[out.length - 1];
    if (last && last.font === face.pdf) last.text += t;
    else out.push({ text: t, font: face.pdf });
  }
  return out;
}

export class Writer {
  page!: PDFPage;
  y = 0;
  pages: PDFPage[] = [];
  constructor(
    readonly doc: PDFDocument,
    readonly regular: Family,
    readonly bold: Family,
  ) {}

  private widths = new Map<string, number>();
  width(text: string, size: number, fam = this.regular) {
    const key = `${fam === this.bold ? "b" : "r"}${size}|${text}`;
    let w = this.widths.get(key);
    if (w === undefined) this.widths.set(key, (w = runs(text, fam).reduce((sum, r) => sum + r.font.widthOfTextAtSize(r.text, size), 0)));
    return w;
  }

  text(text: string, x: number, y: number, size: number, opts: { bold?: boolean; color?: ReturnType<typeof rgb>; page?: PDFPage } = {}) {
    let cx = x;
    const page = opts.page ?? this.page;
    for (const r of runs(text, opts.bold ? this.bold : this.regular)) {
      page.drawText(r.text, { x: cx, y, size, font: r.font, color: opts.color ?? INK });
      cx += r.font.widthOfTextAtSize(r.text, size);
    }
  }

  newPage() {
    this.page = this.doc.addPage(A4);
    this.pages.push(this.page);
    this.y = A4[1] - MARGIN - 14;
  }

  readonly foot = MARGIN + 10;
  ensure(height: number) {
    if (breaksBefore(this.y, height, this.foot)) this.newPage();
  }

  /** What a table of `bodyRows` rows at `size` needs on its first page (its header and first rows). */
  tableLead(bodyRows: number, size = 8.5) {
    return tableLeadHeight(size * 1.55, bodyRows);
  }

  wrap(text: string, size: number, maxWidth: number, bold = false): string[] {
    const lines: string[] = [];
    for (const para of text.split(/\n/)) {
      let line = "";
      for (const word of para.split(/\s+/).filter(Boolean)) {
        const next = line ? `${line} ${word}` : word;
        if (this.width(next, size, bold ? this.bold : this.regular) > maxWidth && line) {
          lines.push(line);
          line = word;
        } else line = next;
      }
      lines.push(line);
    }
    return lines;
  }

  paragraph(text: string, size = 10, opts: { bold?: boolean; color?: ReturnType<typeof rgb>; indent?: number; gap?: number } = {}) {
    const indent = opts.indent ?? 0;
    for (const line of this.wrap(text, size, A4[0] - 2 * MARGIN - indent, opts.bold)) {
      this.ensure(size * 1.35);
      this.text(line, MARGIN + indent, this.y, size, opts);
      this.y -= size * 1.35;
    }
    this.y -= opts.gap ?? 4;
  }

  /** A heading, kept with what follows: `keepNext` points of it (default two 10-pt lines) must fit below. */
  heading(text: string, size = 13, keepNext = linesLeadHeight(10 * 1.35)) {
    this.ensure(headingHeight(size) + keepNext);
    this.y -= 6;
    this.text(text, MARGIN, this.y, size, { bold: true });
    this.y -= size * 0.6;
    this.page.drawLine({ start: { x: MARGIN, y: this.y }, end: { x: A4[0] - MARGIN, y: this.y }, thickness: 0.6, color: RULE });
    this.y -= size;
  }

  /** A table with a repeated header row; columns as fractions of the text width; right-aligned where `right`. */
  table(columns: { label: string; width: number; right?: boolean }[], rows: string[][], size = 8.5) {
    const total = A4[0] - 2 * MARGIN;
    const widths = columns.map((c) => c.width * total);
    const rowHeight = size * 1.55;
    const drawRow = (cells: string[], bold: boolean) => {
      let x = MARGIN;
      cells.forEach((cell, i) => {
        const w = widths[i] - 4;
        let t = cell;
        while (t.length > 1 && this.width(t, size, bold ? this.bold : this.regular) > w) t = `${t.slice(0, -2)}…`;
        const tw = this.width(t, size, bold ? this.bold : this.regular);
        this.text(t, columns[i].right ? x + widths[i] - 4 - tw : x, this.y, size, { bold });
        x += widths[i];
      });
      this.y -= rowHeight;
    };
    const header = () => {
      drawRow(columns.map((c) => c.label), true);
      this.page.drawLine({ start: { x: MARGIN, y: this.y + rowHeight - 3 }, end: { x: A4[0] - MARGIN, y: this.y + rowHeight - 3 }, thickness: 0.5, color: RULE });
    };
    this.ensure(tableLeadHeight(rowHeight, rows.length));
    header();
    for (const row of rows) {
      if (breaksBefore(this.y, rowHeight, this.foot)) {
        this.newPage();
        header();
      }
      drawRow(row, false);
    }
    this.y -= 6;
  }
}

/** fixed digits without a negative zero */
const big = (x: number) => (x >= 1e5 ? x.toExponential(2) : Math.round(x).toString());

function technicalPages(w: Writer, sheet: FeasibilitySheet) {
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

/** A writer on `doc` in the shipped fonts (exported for the layout tests). */
export async function newWriter(doc: PDFDocument) {
  doc.registerFontkit(fontkit);
  const regular = await family(doc, ["regular", "regularExt", "regularGreek"]);
  const bold = await family(doc, ["bold", "boldExt", "boldGreek"]);
  return new Writer(doc, regular, bold);
}

/** `anonymous`: for the committee of a dual-anonymous call, without the team (names, institutions, e-mails). */
export async function buildProposalPdf({ proposalId, anonymous = false }: { proposalId: number; anonymous?: boolean }): Promise<Uint8Array> {
  const proposal = await Proposal.findByPk(proposalId, {
    include: [
      { model: Call, as: "call" },
      { model: ProposalMember, as: "members", include: [{ model: User, as: "user" }] },
    ],
  });
  if (!proposal || !proposal.call) throw new Error(`No proposal ${proposalId}`);
  const call = proposal.call;
  const [sheet, scienceCase] = await Promise.all([computeFeasibilitySheet({ proposalId }), latestScienceCaseBytes({ proposalId })]);

  const doc = await PDFDocument.create();
  const w = await newWriter(doc);
  const codeLabel = proposal.code ?? "draft";
  doc.setTitle(`${proposal.code ?? "Draft"}: ${proposal.title}`);
  doc.setSubject(`Nightshare proposal for call ${call.semesterCode}`);
  doc.setProducer("Nightshare");
  doc.setCreator("Nightshare");
  doc.setKeywords([codeLabel, call.semesterCode]);

  // Cover
  w.newPage();
  w.y = A4[1] - MARGIN - 40;
  w.text("Nightshare · proposal for telescope time", MARGIN, w.y, 10, { color: GREY });
  w.y -= 34;
  w.text(proposal.code ?? "Draft — not submitted", MARGIN, w.y, 22, { bold: true, color: proposal.code ? INK : AMBER });
  w.y -= 30;
  for (const line of w.wrap(proposal.title, 17, A4[0] - 2 * MARGIN, true)) {
    w.text(line, MARGIN, w.y, 17, { bold: true });
    w.y -= 22;
  }
  w.y -= 4;
  w.paragraph(
    `${call.title} (semester ${call.semesterCode}, ${call.semesterStart} to ${call.semesterEnd}) · state: ${proposalStatusLabels[proposal.status as keyof typeof proposalStatusLabels]}` +
      (proposal.submittedAt ? ` · submitted ${proposal.submittedAt.toISOString().slice(0, 16).replace("T", " ")} UTC` : ""),
    10,
    { color: GREY },
  );
  const members = [...(proposal.members ?? [])].sort((a, b) => (a.role === b.role ? a.id - b.id : a.role === "pi" ? -1 : 1));
  const who = (m: ProposalMember) => `${m.user?.name ?? m.email}${m.user?.institution ? `, ${m.user.institution}` : ""}${!m.user ? " (invited)" : ""}`;
  w.heading("Team", 11);
  if (anonymous) w.paragraph("Dual-anonymous review: the team is not shown to the committee.", 10, { gap: 0, color: GREY });
  else for (const m of members) w.paragraph(`${m.role === "pi" ? "PI" : "Co-I"}: ${who(m)}`, 10, { gap: 0 });
  w.y -= 4;
  w.heading("Abstract", 11);
  w.paragraph(proposal.abstract || "(no abstract yet)", 10);
  const facts = [
    `Science category: ${scienceCategoryLabel(proposal.scienceCategory) ?? "not chosen"}`,
    proposal.isMultiSemester ? `Multi-semester programme: ${(proposal.semestersRequested ?? []).join(", ")}` : "Single semester",
    proposal.isTargetOfOpportunity ? "Target of opportunity: yes" : null,
    `${sheet.targets.length} target${sheet.targets.length === 1 ? "" : "s"}, ${sheet.observations.length} observation${sheet.observations.length === 1 ? "" : "s"}`,
  ].filter(Boolean) as string[];
  w.paragraph(facts.join(" · "), 9.5, { color: GREY });
  w.heading("Requested time", 11, w.tableLead(sheet.totals.length + 1, 9.5));
  w.table(
    [
      { label: "Semester", width: 0.15 },
      { label: "Telescope", width: 0.35 },
      { label: "Moon category", width: 0.25 },
      { label: "Hours", width: 0.25, right: true },
    ],
    [...sheet.totals.map((t) => [t.semesterCode, t.telescopeName, t.moonCategory, f(t.hours, 2)]), ...semesterTotals(sheet).map(([semester, label, hours]) => [semester, label, "", hours])],
    9.5,
  );
  const blocking = sheet.problems.filter((p) => p.severity === "blocking").length;
  w.paragraph(
    blocking ? `The feasibility sheet lists ${blocking} blocking problem${blocking === 1 ? "" : "s"} (see the technical pages).` : "The feasibility sheet lists no blocking problem.",
    9.5,
    { color: blocking ? RED : GREY },
  );

  technicalPages(w, sheet);
  const technicalCount = w.pages.length;

  if (scienceCase) {
    const source = await PDFDocument.load(scienceCase, { updateMetadata: false }); // pages only: the source's metadata stays behind
    const copied = await doc.copyPages(source, source.getPageIndices());
    for (const p of copied) w.pages.push(doc.addPage(p));
  } else {
    w.newPage();
    w.heading("Science case");
    w.paragraph("No science case has been uploaded yet.", 11, { color: AMBER });
  }

  // Header and page numbers on every page (science-case pages get them in the margins).
  const total = w.pages.length;
  const generated = new Date().toISOString().slice(0, 16).replace("T", " ");
  w.pages.forEach((page, i) => {
    const { width, height } = page.getSize();
    const head = `${codeLabel} · ${proposal.title}`;
    let h = head;
    while (h.length > 10 && w.width(h, 8) > width - 2 * 40 - 120) h = `${h.slice(0, -2)}…`;
    w.text(h, 40, height - 24, 8, { color: GREY, page });
    const right = i < technicalCount ? (i === 0 ? "cover" : "technical case") : "science case";
    w.text(right, width - 40 - w.width(right, 8), height - 24, 8, { color: GREY, page });
    const foot = `page ${i + 1} of ${total}`;
    w.text(foot, width - 40 - w.width(foot, 8), 18, 8, { color: GREY, page });
    w.text(`Nightshare · call ${call.semesterCode} · generated ${generated} UTC`, 40, 18, 8, { color: GREY, page });
  });

  return doc.save();
}
