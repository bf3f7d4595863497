import { Link, type Href } from "expo-router";
import { Pressable, StyleSheet } from "react-native";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, radius, space } from "@/constants/theme";

/** A navigation link that looks like a button (a link, for screen readers and middle-click). */
export function LinkButton({
  href,
  label,
  tone = "secondary",
  accessibilityLabel,
}: {
  href: Href;
  label: string;
  tone?: "primary" | "secondary" | "quiet";
  accessibilityLabel?: string;
}) {
  return (
    <Link href={href} asChild>
      <Pressable
        role="link"
        accessibilityLabel={accessibilityLabel ?? label}
        // Link asChild needs a flat style object.
        style={StyleSheet.flatten([styles.base, styles[tone]])}
      >
        <Text style={[styles.label, tone === "primary" && styles.onDark]}>{label}</Text>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  base: {
    minHeight: minTap,
    paddingHorizontal: space.lg,
    borderRadius: radius.md,
    justifyContent: "center",
    alignItems: "center",
    alignSelf: "flex-start",
    borderWidth: 1,
    borderColor: "transparent",
  },
  primary: { backgroundColor: colors.field },
  secondary: { backgroundColor: colors.card, borderColor: colors.field },
  quiet: { backgroundColor: "transparent" },
  label: { fontFamily: fonts.semibold, fontSize: 15, color: colors.fieldDark },
  onDark: { color: "#ffffff" },
});
