import { deflateSync } from "fflate";

/**
 * A minimal ZIP writer (APPNOTE.TXT, PKWARE) for 3MF packages: flat entry names only — no directory
 * entries, which some 3MF readers reject — deflated or stored, with CRC-32. The deflate function is
 * injectable: in Node the caller passes zlib's (about three times faster than the pure-JS default).
 */
export type DeflateRaw = (data: Uint8Array) => Uint8Array;

export const defaultDeflateRaw: DeflateRaw = (data) => deflateSync(data, { level: 1 });

const CRC_TABLE = (() => {
  const t = new Int32Array(256 * 8);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    t[n] = c;
  }
  // Slicing-by-8 tables: eight bytes per step.
  for (let n = 0; n < 256; n++) {
    let c = t[n]!;
    for (let k = 1; k < 8; k++) {
      c = t[c & 0xff]! ^ (c >>> 8);
      t[k * 256 + n] = c;
    }
  }
  return t;
})();

export function crc32(data: Uint8Array): number {
  const t = CRC_TABLE;
  let c = -1;
  let i = 0;
  const n8 = data.length - (data.length % 8);
  for (; i < n8; i += 8) {
    const lo = (data[i]! | (data[i + 1]! << 8) | (data[i + 2]! << 16) | (data[i + 3]! << 24)) ^ c;
    const hi = data[i + 4]! | (data[i + 5]! << 8) | (data[i + 6]! << 16) | (data[i + 7]! << 24);
    c =
      t[1792 + (lo & 0xff)]! ^
      t[1536 + ((lo >>> 8) & 0xff)]! ^
      t[1280 + ((lo >>> 16) & 0xff)]! ^
      t[1024 + (lo >>> 24)]! ^
      t[768 + (hi & 0xff)]! ^
      t[512 + ((hi >>> 8) & 0xff)]! ^
      t[256 + ((hi >>> 16) & 0xff)]! ^
      t[hi >>> 24]!;
  }
  for (; i < data.length; i++) c = t[(c ^ data[i]!) & 0xff]! ^ (c >>> 8);
  return (c ^ -1) >>> 0;
}

export type ZipInput = { name: string; data: Uint8Array; store?: boolean };

export function writeZip(entries: ZipInput[], deflateRaw: DeflateRaw = defaultDeflateRaw, date = new Date()): Uint8Array {
  const dosTime = ((date.getUTCHours() << 11) | (date.getUTCMinutes() << 5) | (date.getUTCSeconds() >> 1)) & 0xffff;
  const dosDate = (((date.getUTCFullYear() - 1980) << 9) | ((date.getUTCMonth() + 1) << 5) | date.getUTCDate()) & 0xffff;
  const enc = new TextEncoder();
  const parts: Uint8Array[] = [];
  const central: Uint8Array[] = [];
  let offset = 0;
  for (const e of entries) {
    if (e.name.endsWith("/") || e.name.startsWith("/")) throw new Error(`zip entry names are flat part names: ${e.name}`);
    const name = enc.encode(e.name);
    const crc = crc32(e.data);
    const body = e.store ? e.data : deflateRaw(e.data);
    const method = e.store ? 0 : 8;
    const local = new Uint8Array(30 + name.length);
    const lv = new DataView(local.buffer);
    lv.setUint32(0, 0x04034b50, true);
    lv.setUint16(4, 20, true); // version needed: 2.0 (deflate)
    lv.setUint16(6, 0x0800, true); // UTF-8 names
    lv.setUint16(8, method, true);
    lv.setUint16(10, dosTime, true);
    lv.setUint16(12, dosDate, true);
    lv.setUint32(14, crc, true);
    lv.setUint32(18, body.byteLength, true);
    lv.setUint32(22, e.data.byteLength, true);
    lv.setUint16(26, name.length, true);
    local.set(name, 30);
    const cd = new Uint8Array(46 + name.length);
    const cv = new DataView(cd.buffer);
    cv.setUint32(0, 0x02014b50, true);
    cv.setUint16(4, 20, true);
    cv.setUint16(6, 20, true);
    cv.setUint16(8, 0x0800, true);
    cv.setUint16(10, method, true);
    cv.setUint16(12, dosTime, true);
    cv.setUint16(14, dosDate, true);
    cv.setUint32(16, crc, true);
    cv.setUint32(20, body.byteLength, true);
    cv.setUint32(24, e.data.byteLength, true);
    cv.setUint16(28, name.length, true);
    cv.setUint32(42, offset, true);
    cd.set(name, 46);
    parts.push(local, body);
    central.push(cd);
    offset += local.byteLength + body.byteLength;
  }
  const cdSize = central.reduce((s, c) => s + c.byteLength, 0);
  const end = new Uint8Array(22);
  const ev = new DataView(end.buffer);
  ev.setUint32(0, 0x06054b50, true);
  ev.setUint16(8, entries.length, true);
  ev.setUint16(10, entries.length, true);
  ev.setUint32(12, cdSize, true);
  ev.setUint32(16, offset, true);
  const out = new Uint8Array(offset + cdSize + 22);
  let o = 0;
  for (const p of [...parts, ...central, end]) {
    out.set(p, o);
    o += p.byteLength;
  }
  return out;
}
