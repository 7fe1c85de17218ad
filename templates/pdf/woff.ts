import { readFileSync } from 'node:fs';
import { inflateSync } from 'node:zlib';

const cache = new Map<string, Buffer>();

/**
 * The TrueType/OpenType bytes inside a WOFF 1.0 file, unpacked once per process with Node's zlib.
 * fontkit can read .woff itself, but inflates it in JavaScript on every document, which costs more than
 * the rest of a digest.
 */
export function sfntFromWoff(file: string): Buffer {
  const hit = cache.get(file);
  if (hit) return hit;
  const woff = readFileSync(file);
  if (woff.toString('latin1', 0, 4) !== 'wOFF') {
    cache.set(file, woff);
    return woff;
  }
  const flavor = woff.readUInt32BE(4);
  const numTables = woff.readUInt16BE(12);
  const tables = Array.from({ length: numTables }, (_, i) => {
    const at = 44 + i * 20;
    const offset = woff.readUInt32BE(at + 4);
    const compLength = woff.readUInt32BE(at + 8);
    const origLength = woff.readUInt32BE(at + 12);
    const raw = woff.subarray(offset, offset + compLength);
    return {
      tag: woff.readUInt32BE(at),
      checksum: woff.readUInt32BE(at + 16),
      data: compLength < origLength ? inflateSync(raw) : raw,
    };
  });
  const pad = (n: number) => (n + 3) & ~3;
  const headerSize = 12 + numTables * 16;
  const size = tables.reduce((s, t) => s + pad(t.data.length), headerSize);
  const out = Buffer.alloc(size);
  const power = 2 ** Math.floor(Math.log2(numTables));
  out.writeUInt32BE(flavor, 0);
  out.writeUInt16BE(numTables, 4);
  out.writeUInt16BE(power * 16, 6);
  out.writeUInt16BE(Math.log2(power), 8);
  out.writeUInt16BE(numTables * 16 - power * 16, 10);
  let offset = headerSize;
  tables.forEach((t, i) => {
    const at = 12 + i * 16;
    out.writeUInt32BE(t.tag, at);
    out.writeUInt32BE(t.checksum, at + 4);
    out.writeUInt32BE(offset, at + 8);
    out.writeUInt32BE(t.data.length, at + 12);
    t.data.copy(out, offset);
    offset += pad(t.data.length);
  });
  cache.set(file, out);
  return out;
}
