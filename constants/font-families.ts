import { interFaces } from "./font-names";

/** Native: the registered face names themselves (constants/font-families.web.ts adds a fallback stack for the web). */
export const fontFamilies: Record<keyof typeof interFaces, string> = interFaces;
