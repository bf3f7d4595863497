/**
 * Web: nothing waits for a font. The HTML declares the WOFF2 subsets with font-display: swap (constants/web-fonts.ts),
 * so the first screen draws in the system font and Inter replaces it as each file arrives.
 */
export function useAppFontsReady(): boolean {
  return true;
}
