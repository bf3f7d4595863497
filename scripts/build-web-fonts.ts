import { readFileSync, writeFileSync, mkdirSync } from "node:fs";
import path from "node:path";
import subsetFont from "subset-font";
import { webFontCharset, webFontFaces, webFontFile } from "@/constants/web-fonts";

/**
 * Build the web app's fonts: a WOFF2 subset (webFontCharset) of each shipped Inter TTF in assets/fonts, written to
 * public/fonts. Run after changing the character set or the fonts: node --import tsx scripts/build-web-fonts.ts
 * tests/unit/web-fonts.test.ts checks that the committed files are what this builds.
 */
const root = path.resolve(__dirname, "..");
export const webFontsDir = path.join(root, "public/fonts");

/** OpenType features kept: kerning, ligatures and marks, and tabular figures (the big numbers use them). */
const keepFeatures = ["kern", "liga", "calt", "ccmp", "locl", "mark", "mkmk", "tnum"];

export async function buildWebFont(family: string): Promise<Buffer> {
  const ttf = readFileSync(path.join(root, "assets/fonts", `${family}.ttf`));
  return subsetFont(ttf, webFontCharset, { targetFormat: "woff2", keepFeatures });
}

async function main() {
  mkdirSync(webFontsDir, { recursive: true });
  for (const face of webFontFaces) {
    const woff2 = await buildWebFont(face.family);
    writeFileSync(path.join(webFontsDir, webFontFile(face.family)), woff2);
    console.log(`${webFontFile(face.family)}: ${(woff2.length / 1024).toFixed(1)} KB`);
  }
}

if (require.main === module) void main();
