import { mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { crc32, deflateSync } from "node:zlib";

/**
 * Draws Plotbank's icon, assets/images/icon.png: four trial plots seen from above on a field-green tile, one plot in
 * wheat gold (the treatment that responded). The web export turns it into favicon.ico (app.json web.favicon).
 * Run `node --import tsx scripts/draw-icon.ts` after changing it; the drawing is plain geometry, so the file is
 * reproducible byte for byte.
 */
const size = 256;
const field = [0x2f, 0x6b, 0x3a]; // the app's theme colour (app.json themeColor)
const plot = [0xd9, 0xea, 0xcf];
const responded = [0xe9, 0xc4, 0x6a];

/** Inside a square of side `side` at (x0, y0) whose corners are rounded with radius r. */
function inRoundedSquare(x: number, y: number, x0: number, y0: number, side: number, r: number): boolean {
  if (x < x0 || y < y0 || x > x0 + side || y > y0 + side) return false;
  const cx = Math.min(Math.max(x, x0 + r), x0 + side - r);
  const cy = Math.min(Math.max(y, y0 + r), y0 + side - r);
  return (x - cx) ** 2 + (y - cy) ** 2 <= r * r;
}

const plotSide = 76;
const gap = 16;
const margin = (size - 2 * plotSide - gap) / 2;
const plots = [0, 1].flatMap((row) =>
  [0, 1].map((col) => ({
    x: margin + col * (plotSide + gap),
    y: margin + row * (plotSide + gap),
    colour: row === 0 && col === 1 ? responded : plot,
  })),
);

/** RGBA of one pixel, from 4 × 4 samples so the rounded edges are smooth. */
function pixel(px: number, py: number): number[] {
  const sums = [0, 0, 0, 0];
  const n = 4;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const x = px + (i + 0.5) / n;
      const y = py + (j + 0.5) / n;
      if (!inRoundedSquare(x, y, 0, 0, size, 56)) continue;
      const colour = plots.find((p) => inRoundedSquare(x, y, p.x, p.y, plotSide, 12))?.colour ?? field;
      for (let c = 0; c < 3; c++) sums[c]! += colour[c]!;
      sums[3]! += 255;
    }
  }
  const covered = sums[3]! / 255;
  // Colour averaged over the covered samples only, so edges fade out in alpha, not into black.
  return covered ? [sums[0]! / covered, sums[1]! / covered, sums[2]! / covered, sums[3]! / (n * n)].map(Math.round) : [0, 0, 0, 0];
}

function chunk(type: string, data: Buffer): Buffer {
  const length = Buffer.alloc(4);
  length.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, "latin1"), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([length, body, crc]);
}

/** A PNG (8-bit RGBA, no filtering) of the icon. */
export function drawIcon(): Buffer {
  const rows: Buffer[] = [];
  for (let y = 0; y < size; y++) {
    const row = Buffer.alloc(1 + size * 4); // leading 0: filter type "none"
    for (let x = 0; x < size; x++) Buffer.from(pixel(x, y)).copy(row, 1 + x * 4);
    rows.push(row);
  }
  const header = Buffer.alloc(13);
  header.writeUInt32BE(size, 0);
  header.writeUInt32BE(size, 4);
  header.set([8, 6, 0, 0, 0], 8); // bit depth 8, colour type RGBA, deflate, no filter, no interlace
  const signature = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
  return Buffer.concat([
    signature,
    chunk("IHDR", header),
    chunk("IDAT", deflateSync(Buffer.concat(rows), { level: 9 })),
    chunk("IEND", Buffer.alloc(0)),
  ]);
}

if (require.main === module) {
  const out = path.resolve(__dirname, "../assets/images/icon.png");
  mkdirSync(path.dirname(out), { recursive: true });
  writeFileSync(out, drawIcon());
  console.log(`Wrote ${path.relative(process.cwd(), out)}`);
}
