import { interFaces } from "./font-names";

/**
 * The web app's fonts: WOFF2 subsets of the shipped Inter TTFs (assets/fonts), built by scripts/build-web-fonts.ts
 * into public/fonts, which the web export copies to its root. Native builds load the TTFs (constants/fonts.ts).
 * tests/unit/web-fonts.test.ts rebuilds them and checks the committed files and the character set.
 */
export const webFontFaces = [
  { family: interFaces.regular, weight: 400 },
  { family: interFaces.medium, weight: 500 },
  { family: interFaces.semibold, weight: 600 },
  { family: interFaces.bold, weight: 700 },
] as const;

export const webFontFile = (family: string) => `${family}.woff2`;
const webFontUrl = (family: string) => `/fonts/${webFontFile(family)}`;

/**
 * What the subsets keep: printable ASCII, Latin-1, the Latin Extended-A letters of names, and the punctuation, math
 * and arrow signs the screens write (· − – — … ² ≈ ≥ → ✓ …). A character outside it is drawn in the system font.
 */
const ranges: [number, number][] = [
  [0x20, 0x7e],
  [0xa0, 0xff],
  [0x100, 0x17f],
  [0x2010, 0x2027],
  [0x2030, 0x203a],
  [0x2070, 0x209c],
];
const extras = "ȳ̂ΓΣΦαεθμνπτφᵀᵢⱼ€−×÷±√≈≠≤≥∞→←↑↓↗↘✓✗▲▼▸▾•";
export const webFontCharset = [
  ...ranges.flatMap(([a, b]) => Array.from({ length: b - a + 1 }, (_, i) => String.fromCodePoint(a + i))),
  ...extras,
]
  .filter((c, i, all) => all.indexOf(c) === i)
  .join("");

/**
 * The @font-face rules the server puts into the web app's HTML: font-display swap, so text is drawn at once in the
 * system font and redrawn in Inter when each file arrives; nothing waits for a font.
 */
export const webFontCss = webFontFaces
  .map(
    (f) =>
      `@font-face{font-family:${f.family};src:url(${webFontUrl(f.family)}) format("woff2");font-weight:normal;font-style:normal;font-display:swap}`,
  )
  .join("");
