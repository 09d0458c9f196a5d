// Draws Stillfield's app icon (the mark: a few level, parallel lines — a settled field — on the
// brand colour) as SVG and writes the PNGs the web-app manifest names into public/icons/.
// Run once when the mark changes (`npx tsx scripts/make-icons.ts`); the PNGs are committed.
import fs from "node:fs";
import path from "node:path";
import sharp from "sharp";

const BRAND = "#35566f";
const PAPER = "#f6f5f1";

/** The mark on a square; `safe` shrinks it into the centre 80 % for maskable icons. */
export function iconSvg(size: number, safe = false): string {
  const s = safe ? 0.8 : 1;
  const off = (size * (1 - s)) / 2;
  const u = (size * s) / 24;
  const bar = (x: number, y: number, w: number, opacity: number) =>
    `<rect x="${off + x * u}" y="${off + y * u}" width="${w * u}" height="${2.2 * u}" rx="${1.1 * u}" fill="${PAPER}" opacity="${opacity}"/>`;
  const corner = safe ? 0 : size * 0.18;
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${size}" height="${size}" viewBox="0 0 ${size} ${size}">`,
    `<rect width="${size}" height="${size}" rx="${corner}" fill="${BRAND}"/>`,
    bar(4, 6.4, 16, 1),
    bar(6, 10.9, 12, 0.8),
    bar(8, 15.4, 8, 0.6),
    `</svg>`,
  ].join("");
}

async function main() {
  const dir = path.resolve(import.meta.dirname, "../public/icons");
  fs.mkdirSync(dir, { recursive: true });
  const outputs: Array<[string, number, boolean]> = [
    ["icon-192.png", 192, false],
    ["icon-512.png", 512, false],
    ["icon-maskable-512.png", 512, true],
    ["apple-touch-icon.png", 180, false],
    ["badge-72.png", 72, false],
  ];
  for (const [name, size, safe] of outputs) {
    await sharp(Buffer.from(iconSvg(size, safe))).png({ compressionLevel: 9 }).toFile(path.join(dir, name));
    console.log(`wrote public/icons/${name}`);
  }
  fs.writeFileSync(path.join(dir, "icon.svg"), iconSvg(512));
}

void main();
