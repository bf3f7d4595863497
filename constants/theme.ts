import { fontFamilies } from "./font-families";

/**
 * Plotbank's palette. Text colours are chosen for WCAG AA contrast (4.5:1 or more) on the surfaces they sit on:
 * ink on paper 14.8:1, muted on paper 6.0:1, white on field 6.4:1, danger on paper 6.1:1, wheatText on wheatTint 5.8:1.
 * tests/browser/contrast.test.ts checks every rendered text against its real background.
 */
export const colors = {
  paper: "#f7f5ef",
  card: "#ffffff",
  ink: "#1c2a22",
  muted: "#4f5a52",
  line: "#d6d1c4",
  field: "#2f6b3a",
  fieldDark: "#214d2a",
  fieldTint: "#e3eee2",
  wheat: "#9a6b00",
  /** Wheat for text: 5.8:1 on wheatTint, 6.8:1 on white (plain wheat is 4.0:1 on its tint, too little for text). */
  wheatText: "#7a5400",
  wheatTint: "#f6ecd2",
  danger: "#a3262a",
  dangerTint: "#f9e3e2",
  info: "#1f5a8a",
  infoTint: "#e2edf6",
  focus: "#1f5a8a",
} as const;

/** Soil-test classes, ordered low to high; a sequential scale that also differs in lightness for colour-blind readers. */
export const soilClassColors: Record<string, string> = {
  very_low: "#8c2d04",
  low: "#d95f0e",
  optimum: "#7a8b2e",
  high: "#2b7a78",
  very_high: "#253494",
};

/** Inter's faces (on the web followed by the system font, see constants/font-families.web.ts). */
export const fonts = fontFamilies;

export const space = { xs: 4, sm: 8, md: 12, lg: 16, xl: 24, xxl: 32 } as const;
export const radius = { sm: 6, md: 10, lg: 14 } as const;
/** Minimum touch target (WCAG 2.5.5 / platform guidance). */
export const minTap = 44;
/** Wider than this, the app shows a side navigation and two-column screens. */
export const wideBreakpoint = 900;
/** Shared stale time for queries of published data (it changes only when a version is published). */
export const staleTimeMs = 60_000;
