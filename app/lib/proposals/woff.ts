import { inflateSync } from "node:zlib";

/**
 * WOFF 1.0 to the TrueType file it wraps (the WOFF spec: a table directory of zlib-compressed
 * tables). fontkit reads WOFF directly but inflates the glyph table again on every glyph access,
 * which made the PDF slow; the unpacked font is the same font, byte for byte its sfnt tables.
 */
export function woffToSfnt(woff: Uint8Array): Uint8Array {
  const src = Buffer.from(woff.buffer, woff.byteOffset, woff.byteLength);
  if (src.toString("latin1", 0, 4) !== "wOFF") throw new Error("not a WOFF 1.0 font");
  const flavor = src.readUInt32BE(4);
  const numTables = src.readUInt16BE(12);
  const tables: { tag: number; checksum: number; data: Buffer }[] = [];
  for (let i = 0; i < numTables; i++) {
    const e = 44 + 20 * i;
    const offset = src.readUInt32BE(e + 4);
    const compLength = src.readUInt32BE(e + 8);
    const origLength = src.readUInt32BE(e + 12);
    const raw = src.subarray(offset, offset + compLength);
    tables.push({ tag: src.readUInt32BE(e), checksum: src.readUInt32BE(e + 16), data: compLength < origLength ? inflateSync(raw) : Buffer.from(raw) });
  }
  tables.sort((x, y) => x.tag - y.tag);
  const pad = (n: number) => (n + 3) & ~3;
  const headerSize = 12 + 16 * numTables;
  const out = Buffer.alloc(headerSize + tables.reduce((n, t) => n + pad(t.data.length), 0));
  let entrySelector = 0;
  while (2 ** (entrySelector + 1) <= numTables) entrySelector++;
  const searchRange = 2 ** entrySelector * 16;
  out.writeUInt32BE(flavor, 0);
  out.writeUInt16BE(numTables, 4);
  out.writeUInt16BE(searchRange, 6);
  out.writeUInt16BE(entrySelector, 8);
  out.writeUInt16BE(numTables * 16 - searchRange, 10);
  let at = headerSize;
  tables.forEach((t, i) => {
    const e = 12 + 16 * i;
    out.writeUInt32BE(t.tag, e);
    out.writeUInt32BE(t.checksum, e + 4);
    out.writeUInt32BE(at, e + 8);
    out.writeUInt32BE(t.data.length, e + 12);
    t.data.copy(out, at);
    at += pad(t.data.length);
  });
  return new Uint8Array(out.buffer, out.byteOffset, out.byteLength);
}
