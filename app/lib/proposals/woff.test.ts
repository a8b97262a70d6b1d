// The WOFF unpacker against fontkit's own WOFF reader (the reference): same glyphs, same
// advances and same outlines from the unpacked TrueType file.
import { readFileSync } from "node:fs";
import fontkit from "@pdf-lib/fontkit";
import { describe, expect, it } from "vitest";
import { woffToSfnt } from "./woff";

type Font = { numGlyphs: number; layout(s: string): { glyphs: { id: number; advanceWidth: number }[] }; getGlyph(id: number): { path: { toSVG(): string } } };
const dir = "node_modules/@fontsource/source-sans-3/files/";

describe("woffToSfnt", () => {
  for (const name of ["latin-400", "latin-ext-600", "greek-400"]) {
    it(`unpacks Source Sans 3 ${name} into the same font`, () => {
      const woff = new Uint8Array(readFileSync(`${dir}source-sans-3-${name}-normal.woff`));
      const ttf = woffToSfnt(woff);
      expect(Buffer.from(ttf.subarray(0, 4)).toString("hex")).toBe("00010000");
      const a = fontkit.create(Buffer.from(woff)) as unknown as Font;
      const b = fontkit.create(Buffer.from(ttf)) as unknown as Font;
      expect(b.numGlyphs).toBe(a.numGlyphs);
      const text = "Hollowmere Field · μα* ≈ 12.3 ffi Ωσ Łódź — 0123456789";
      const glyphs = (f: Font) => f.layout(text).glyphs.map((g) => [g.id, g.advanceWidth]);
      expect(glyphs(b)).toEqual(glyphs(a));
      for (const id of [1, 40, a.numGlyphs - 1]) expect(b.getGlyph(id).path.toSVG()).toBe(a.getGlyph(id).path.toSVG());
    });
  }
  it("refuses what is not WOFF 1.0", () => {
    expect(() => woffToSfnt(new Uint8Array(64))).toThrow(/not a WOFF/);
  });
});
