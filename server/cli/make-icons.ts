// Draws Tideline's app icons from the product's own mark — two breaker bars with the
// flood's water line across them, in the "night watch" palette — and writes the PNGs the web app
// manifest names. Run `node --import tsx server/cli/make-icons.ts` after changing the drawing;
// the PNGs are committed, so a build needs nothing but the files in src/public/icons.
import { writeFileSync } from "node:fs";
import { join } from "node:path";
import sharp from "sharp";
import { projectRoot } from "../../db/pg";

const HULL = "#0d141b";
const PANEL = "#17222c";
const EDGE = "#31444f";
const MIST = "#b4c3cd";
const BRASS = "#e5b24f";

/** `safe`: the share of the square the mark may use (maskable icons keep it inside the 80 % circle). */
function svg(safe: number, rounded: boolean): string {
  const s = 512;
  const m = (s * (1 - safe)) / 2;
  const k = (s * safe) / 32; // the wordmark's 32-unit drawing, scaled
  const t = (x: number) => m + x * k;
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${s}" height="${s}" viewBox="0 0 ${s} ${s}">
  <rect width="${s}" height="${s}" rx="${rounded ? 96 : 0}" fill="${HULL}"/>
  <rect x="${t(1)}" y="${t(1)}" width="${30 * k}" height="${30 * k}" rx="${6 * k}" fill="${PANEL}" stroke="${EDGE}" stroke-width="${k}"/>
  <rect x="${t(9)}" y="${t(6)}" width="${4 * k}" height="${20 * k}" rx="${k}" fill="${MIST}"/>
  <rect x="${t(19)}" y="${t(6)}" width="${4 * k}" height="${20 * k}" rx="${k}" fill="${MIST}"/>
  <path d="M${t(3)} ${t(19)}c${4 * k} 0 ${4 * k}-${3 * k} ${8.5 * k}-${3 * k}s${4.5 * k} ${3 * k} ${9 * k} ${3 * k} ${4 * k}-${3 * k} ${8.5 * k}-${3 * k}" fill="none" stroke="${BRASS}" stroke-width="${3 * k}" stroke-linecap="round"/>
</svg>`;
}

const dir = join(projectRoot, "src", "public", "icons");
writeFileSync(join(dir, "tideline.svg"), svg(0.86, true));
const plain = Buffer.from(svg(0.86, true));
const maskable = Buffer.from(svg(0.62, false));
for (const [name, input, size] of [
  ["tideline-192.png", plain, 192],
  ["tideline-512.png", plain, 512],
  ["tideline-maskable-512.png", maskable, 512],
  ["tideline-apple-180.png", Buffer.from(svg(0.78, false)), 180],
] as const)
  await sharp(input).resize(size, size).png({ compressionLevel: 9 }).toFile(join(dir, name));
console.log(`icons written to ${dir}`);
