// The PDF writer: page, text and table layout in Source Sans 3 from the @fontsource package
// that ships with the app (WOFF, unpacked to TrueType once per process, embedded and subset by
// pdf-lib with @pdf-lib/fontkit). Speed: every string is laid out (OpenType shaping) once per
// embedded font, not for every width check and draw. Used by the proposal PDF, receipts and
// decision letters.

import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import fontkit from "@pdf-lib/fontkit";
import { PDFDocument, rgb, type PDFFont, type PDFPage } from "pdf-lib";
import { woffToSfnt } from "~/lib/proposals/woff";
import { breaksBefore, headingHeight, linesLeadHeight, tableLeadHeight } from "~/lib/proposals/pdf-layout";

export const A4: [number, number] = [595.28, 841.89];
export const MARGIN = 50;
export const INK = rgb(0.075, 0.13, 0.23);
export const GREY = rgb(0.4, 0.45, 0.52);
export const RED = rgb(0.6, 0.1, 0.1);
export const AMBER = rgb(0.55, 0.35, 0.02);
export const RULE = rgb(0.8, 0.83, 0.87);

export type FontFace = { pdf: PDFFont; has: (cp: number) => boolean };
export type Family = FontFace[];

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

/** A writer on `doc` in the shipped fonts (exported for the layout tests). */
export async function newWriter(doc: PDFDocument) {
  doc.registerFontkit(fontkit);
  const regular = await family(doc, ["regular", "regularExt", "regularGreek"]);
  const bold = await family(doc, ["bold", "boldExt", "boldGreek"]);
  return new Writer(doc, regular, bold);
}
