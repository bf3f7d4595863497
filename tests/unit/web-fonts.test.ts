import { readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { webFontCharset, webFontCss, webFontFaces, webFontFile } from "@/constants/web-fonts";
import { buildWebFont, webFontsDir } from "@/scripts/build-web-fonts";

// The web app's fonts are WOFF2 subsets of the shipped TTFs (whose provenance font-provenance.test.ts checks), built by
// scripts/build-web-fonts.ts. These checks fail when the committed files are not what the script builds, or when a
// screen writes a character the subsets do not keep.
const root = path.resolve(__dirname, "../..");

function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) return sourceFiles(full);
    return /\.tsx?$/.test(name) ? [full] : [];
  });
}

describe("web fonts", () => {
  it("one WOFF2 file per weight the theme names, and nothing else in public/fonts", () => {
    expect(readdirSync(webFontsDir).sort()).toEqual(webFontFaces.map((f) => webFontFile(f.family)).sort());
    for (const face of webFontFaces) {
      const file = readFileSync(path.join(webFontsDir, webFontFile(face.family)));
      expect(file.subarray(0, 4).toString("latin1")).toBe("wOF2");
      // A subset: far smaller than the TTF it comes from.
      expect(file.length).toBeLessThan(readFileSync(path.join(root, "assets/fonts", `${face.family}.ttf`)).length / 5);
    }
  });

  it.each(webFontFaces.map((f) => f.family))("%s.woff2 is what scripts/build-web-fonts.ts builds from the TTF", async (family) => {
    const built = await buildWebFont(family);
    expect(built.equals(readFileSync(path.join(webFontsDir, webFontFile(family))))).toBe(true);
  });

  it("the character set holds every non-ASCII character the client's code writes", () => {
    const clientDirs = ["app", "components", "constants", "hooks", "lib"];
    const used = new Set<string>();
    for (const dir of clientDirs)
      for (const file of sourceFiles(path.join(root, dir))) for (const c of readFileSync(file, "utf8")) used.add(c);
    const missing = [...used].filter((c) => c.codePointAt(0)! > 0x7e && !webFontCharset.includes(c));
    expect(missing, "add these to webFontCharset (constants/web-fonts.ts) and run scripts/build-web-fonts.ts").toEqual([]);
  });

  it("every face is declared with font-display: swap", () => {
    for (const face of webFontFaces) expect(webFontCss).toContain(`font-family:${face.family};src:url(/fonts/${face.family}.woff2)`);
    expect(webFontCss.match(/font-display:swap/g)).toHaveLength(webFontFaces.length);
  });
});
