// Keep-with-next in the proposal PDF: a heading (or a table's caption) never stands alone at a
// page foot. The real Writer draws into a real PDF; pdftotext (poppler-utils) reads each page
// back, so the check does not depend on the layout code's own bookkeeping.
import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { PDFDocument } from "pdf-lib";
import { describe, expect, it, vi } from "vitest";
import { breaksBefore, headingHeight, tableLeadHeight } from "./pdf-layout";

// The PDF module's data sources need a database; the Writer does not.
vi.mock("~/models/index.server", () => ({ Call: {}, Proposal: {}, ProposalMember: {}, User: {} }));
vi.mock("~/lib/proposals/feasibility.server", () => ({ computeFeasibilitySheet: () => null }));
vi.mock("~/lib/proposals/science-case.server", () => ({ latestScienceCaseBytes: () => null }));
const { newWriter } = await import("./pdf.server");

const columns = [
  { label: "Target", width: 0.5 },
  { label: "Hours", width: 0.5, right: true },
];
const rows = Array.from({ length: 6 }, (_, i) => [`Row${i + 1}field`, `${i + 1}.00`]);

async function pagesText(startY: number) {
  const doc = await PDFDocument.create();
  const w = await newWriter(doc);
  w.newPage();
  w.y = startY;
  w.heading("Orphan check heading", 11, w.tableLead(rows.length));
  w.table(columns, rows);
  const dir = mkdtempSync(path.join(tmpdir(), "pdf-layout-"));
  const file = path.join(dir, "t.pdf");
  writeFileSync(file, await doc.save());
  return w.pages.map((_, i) => execFileSync("pdftotext", ["-layout", "-f", String(i + 1), "-l", String(i + 1), file, "-"], { encoding: "utf8" }));
}

describe("keep-with-next in the proposal PDF", () => {
  it("the break decision: a block goes to the next page exactly when it would cross the foot", () => {
    expect(breaksBefore(100, 40, 60)).toBe(false);
    expect(breaksBefore(100, 40.01, 60)).toBe(true);
    // a heading of 11 pt: 6 pt above + 11 × 1.6 (text, rule, space) = 23.6 pt (worked by hand)
    expect(headingHeight(11)).toBeCloseTo(23.6, 10);
    // a table at 8.5 pt keeps its header and two body rows: 3 × 13.175 pt; one row when it has one
    expect(tableLeadHeight(8.5 * 1.55, 6)).toBeCloseTo(39.525, 10);
    expect(tableLeadHeight(8.5 * 1.55, 1)).toBeCloseTo(26.35, 10);
  });

  // The page foot is at 60 pt. Every start from just above the foot to well clear of it, in 4-pt
  // steps: the heading, the header row and the first two rows are always on one page.
  it("a heading starting anywhere near the page foot stays with the table's header and first two rows", async () => {
    const starts = Array.from({ length: 20 }, (_, i) => 62 + 4 * i);
    let moved = 0;
    for (const y of starts) {
      const pages = await pagesText(y);
      const home = pages.findIndex((p) => p.includes("Orphan check heading"));
      expect(home, `start ${y}`).toBeGreaterThanOrEqual(0);
      expect(pages[home], `start ${y}`).toMatch(/Target\s+Hours/);
      expect(pages[home], `start ${y}`).toContain("Row1field");
      expect(pages[home], `start ${y}`).toContain("Row2field");
      if (home > 0) {
        moved++;
        // the page it left holds nothing of the table
        expect(pages[home - 1], `start ${y}`).not.toContain("Row1field");
      }
    }
    // both outcomes occur in the range: near the foot it moves, higher up it stays
    expect(moved).toBeGreaterThan(0);
    expect(moved).toBeLessThan(starts.length);
  });
});
