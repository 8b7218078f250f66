// Draws the app icons (original artwork, no external assets) and writes them as PNG files to
// public/icons/: a meridian section of a flattened Earth with one quadrant picked out and a short
// arc segment marked. Run: node scripts/make-icons.js   (committed output; rerun after changes).
// PNG: signature, IHDR, one zlib-deflated IDAT of filter-0 RGBA scanlines, IEND (PNG spec, W3C 2003).
import { deflateSync } from 'node:zlib';
import { mkdirSync, writeFileSync } from 'node:fs';

const BG = [0x17, 0x49, 0x4d];
const CREAM = [0xf3, 0xef, 0xe4];
const AMBER = [0xf2, 0xa5, 0x1a];
const SAMPLES = 4; // supersampling per axis for anti-aliased edges

const CRC_TABLE = Array.from({ length: 256 }, (_, n) => {
  let c = n;
  for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});
function crc32(buf) {
  let c = 0xffffffff;
  for (const b of buf) c = CRC_TABLE[(c ^ b) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}
function chunk(type, data) {
  const len = Buffer.alloc(4); len.writeUInt32BE(data.length);
  const td = Buffer.concat([Buffer.from(type, 'ascii'), data]);
  const crc = Buffer.alloc(4); crc.writeUInt32BE(crc32(td));
  return Buffer.concat([len, td, crc]);
}
function png(size, rgba) {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(size, 0); ihdr.writeUInt32BE(size, 4);
  ihdr[8] = 8; ihdr[9] = 6; ihdr[10] = 0; ihdr[11] = 0; ihdr[12] = 0;
  const raw = Buffer.alloc(size * (size * 4 + 1));
  for (let y = 0; y < size; y++) {
    raw[y * (size * 4 + 1)] = 0;
    rgba.copy(raw, y * (size * 4 + 1) + 1, y * size * 4, (y + 1) * size * 4);
  }
  return Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), chunk('IHDR', ihdr), chunk('IDAT', deflateSync(raw, { level: 9 })), chunk('IEND', Buffer.alloc(0))]);
}

/** Colour at unit coordinates (u, v) in [-1, 1]², v up; `scale` shrinks the artwork (maskable safe zone). */
function shade(u, v, scale, roundCorners) {
  if (roundCorners) {
    const r = 0.22, ax = Math.abs(u), ay = Math.abs(v);
    if (ax > 1 - r && ay > 1 - r && Math.hypot(ax - (1 - r), ay - (1 - r)) > r) return null;
  }
  const x = u / scale, y = v / scale;
  const a = 0.78, b = 0.66; // exaggerated flattening so it reads at small sizes
  const rho = Math.hypot(x / a, y / b);
  const ring = Math.abs(rho - 1) < 0.045;
  const theta = Math.atan2(y / b, x / a);
  if (ring && theta >= 0 && theta <= Math.PI / 2) return AMBER;           // the quadrant
  if (ring) return CREAM;
  if (Math.abs(y) < 0.018 && Math.abs(x) < a) return CREAM;               // equator
  if (Math.abs(x) < 0.018 && Math.abs(y) < b) return CREAM;               // axis
  const t0 = 0.55, t1 = 0.85;                                              // a measured arc, ticked
  const tick = (t) => Math.abs(theta - t) < 0.035 && rho > 0.86 && rho < 1.16;
  if (tick(t0) || tick(t1)) return AMBER;
  return BG;
}

function draw(size, scale, roundCorners) {
  const out = Buffer.alloc(size * size * 4);
  for (let py = 0; py < size; py++) {
    for (let px = 0; px < size; px++) {
      let r = 0, g = 0, b = 0, a = 0;
      for (let sy = 0; sy < SAMPLES; sy++) {
        for (let sx = 0; sx < SAMPLES; sx++) {
          const u = ((px + (sx + 0.5) / SAMPLES) / size) * 2 - 1;
          const v = 1 - ((py + (sy + 0.5) / SAMPLES) / size) * 2;
          const c = shade(u, v, scale, roundCorners);
          if (c) { r += c[0]; g += c[1]; b += c[2]; a += 255; }
        }
      }
      const n = SAMPLES * SAMPLES, i = (py * size + px) * 4;
      const cov = a / 255;
      out[i] = cov ? Math.round(r / cov) : 0; out[i + 1] = cov ? Math.round(g / cov) : 0; out[i + 2] = cov ? Math.round(b / cov) : 0;
      out[i + 3] = Math.round(a / n);
    }
  }
  return png(size, out);
}

const dir = new URL('../public/icons/', import.meta.url);
mkdirSync(dir, { recursive: true });
const files = [
  ['icon-192.png', 192, 0.95, true],
  ['icon-512.png', 512, 0.95, true],
  // Maskable: full-bleed background, artwork inside the central 80 % safe zone.
  ['icon-maskable-512.png', 512, 0.72, false],
  ['apple-touch-icon-180.png', 180, 0.85, false],
  ['favicon-32.png', 32, 1.0, true],
];
for (const [name, size, scale, round] of files) {
  writeFileSync(new URL(name, dir), draw(size, scale, round));
  console.log(`wrote public/icons/${name} (${size}×${size})`);
}
