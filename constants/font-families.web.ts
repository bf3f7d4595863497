import { interFaces } from "./font-names";

/**
 * Web: each face, then the system font. The page's @font-face rules (constants/web-fonts.ts) swap Inter in when its
 * file arrives, so text is readable before any font has loaded.
 */
const systemStack = 'system-ui, -apple-system, "Segoe UI", Roboto, Arial, sans-serif';
export const fontFamilies: Record<keyof typeof interFaces, string> = {
  regular: `${interFaces.regular}, ${systemStack}`,
  medium: `${interFaces.medium}, ${systemStack}`,
  semibold: `${interFaces.semibold}, ${systemStack}`,
  bold: `${interFaces.bold}, ${systemStack}`,
};
