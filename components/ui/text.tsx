import { Text as RNText, type TextProps, StyleSheet } from "react-native";
import { colors, fonts } from "@/constants/theme";

type Variant = "body" | "title" | "heading" | "subheading" | "label" | "caption" | "mono" | "number";

/**
 * Body text, or a heading: a screen's title is its one h1 and section headings are h2; a heading inside a section
 * passes `aria-level={3}`. react-native-web renders role="heading" with aria-level N as <hN>.
 */
export function Text({
  variant = "body",
  style,
  "aria-level": ariaLevel,
  ...props
}: TextProps & { variant?: Variant; "aria-level"?: number }) {
  const heading = variant === "title" || variant === "heading";
  const level = heading ? (ariaLevel ?? (variant === "title" ? 1 : 2)) : ariaLevel;
  return <RNText role={heading ? "heading" : undefined} {...props} aria-level={level} style={[styles.base, styles[variant], style]} />;
}

const styles = StyleSheet.create({
  base: { color: colors.ink, fontFamily: fonts.regular, fontSize: 16, lineHeight: 22 },
  body: {},
  title: { fontFamily: fonts.bold, fontSize: 24, lineHeight: 30 },
  heading: { fontFamily: fonts.semibold, fontSize: 19, lineHeight: 25 },
  subheading: { fontFamily: fonts.semibold, fontSize: 16, lineHeight: 22 },
  label: { fontFamily: fonts.medium, fontSize: 14, lineHeight: 19, color: colors.muted },
  caption: { fontSize: 13, lineHeight: 18, color: colors.muted },
  mono: { fontFamily: "monospace", fontSize: 13, lineHeight: 18 },
  number: { fontFamily: fonts.bold, fontSize: 30, lineHeight: 36, fontVariant: ["tabular-nums"] },
});
