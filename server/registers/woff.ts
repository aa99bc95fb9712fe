import { inflateSync } from 'node:zlib';

/**
 * A WOFF 1.0 font (W3C "WOFF File Format 1.0") unpacked into the plain TrueType/OpenType file it
 * wraps. The app ships Lato as WOFF (@fontsource/lato); the PDF's font library decompresses a WOFF
 * table every time it reads it, once per glyph of the glyph table, which made unpacking the font
 * a tenth of a large register's writing time. Unpacked once, the font is read as a plain file.
 */
export function woffToSfnt(woff: Buffer): Buffer {
  if (woff.readUInt32BE(0) !== 0x774f4646) throw new Error('Not a WOFF 1.0 font (no wOFF signature).');
  const flavor = woff.readUInt32BE(4);
  const numTables = woff.readUInt16BE(12);
  const tables = Array.from({ length: numTables }, (_, i) => {
    const at = 44 + i * 20;
    const [tag, offset, compLength, origLength, checksum] = [0, 4, 8, 12, 16].map((o) => woff.readUInt32BE(at + o)) as [number, number, number, number, number];
    const stored = woff.subarray(offset, offset + compLength);
    const data = compLength < origLength ? inflateSync(stored) : stored;
    if (data.length !== origLength) throw new Error('A WOFF table does not unpack to its stated length.');
    return { tag, checksum, data };
  });

  // The sfnt offset table: binary-search fields from the largest power of two not above numTables.
  const power = 2 ** Math.floor(Math.log2(numTables));
  const headerLength = 12 + 16 * numTables;
  const padded = (n: number) => (n + 3) & ~3;
  const out = Buffer.alloc(headerLength + tables.reduce((sum, t) => sum + padded(t.data.length), 0));
  out.writeUInt32BE(flavor, 0);
  out.writeUInt16BE(numTables, 4);
  out.writeUInt16BE(power * 16, 6);
  out.writeUInt16BE(Math.log2(power), 8);
  out.writeUInt16BE(numTables * 16 - power * 16, 10);
  let offset = headerLength;
  tables.forEach((t, i) => {
    const at = 12 + 16 * i;
    out.writeUInt32BE(t.tag, at);
    out.writeUInt32BE(t.checksum, at + 4);
    out.writeUInt32BE(offset, at + 8);
    out.writeUInt32BE(t.data.length, at + 12);
    t.data.copy(out, offset);
    offset += padded(t.data.length);
  });
  return out;
}
