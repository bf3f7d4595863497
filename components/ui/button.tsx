import { ActivityIndicator, Pressable, StyleSheet, type PressableProps, type StyleProp, type ViewStyle } from "react-native";
import { colors, fonts, minTap, radius, space } from "@/constants/theme";
import { Text } from "./text";

type Tone = "primary" | "secondary" | "danger" | "quiet";

export interface ButtonProps extends Omit<PressableProps, "style" | "children"> {
  label: string;
  tone?: Tone;
  busy?: boolean;
  style?: StyleProp<ViewStyle>;
}

export function Button({ label, tone = "primary", busy, disabled, style, accessibilityLabel, ...props }: ButtonProps) {
  const off = disabled || busy;
  return (
    <Pressable
      role="button"
      accessibilityLabel={accessibilityLabel ?? label}
      accessibilityState={{ disabled: !!off, busy: !!busy }}
      disabled={off}
      style={({ pressed, hovered, focused }: { pressed: boolean; hovered?: boolean; focused?: boolean }) => [
        styles.base,
        styles[tone],
        (pressed || hovered) && !off && styles[`${tone}Active` as const],
        focused && styles.focused,
        off && styles.disabled,
        style,
      ]}
      {...props}
    >
      {busy ? <ActivityIndicator color={tone === "primary" || tone === "danger" ? "#fff" : colors.field} /> : null}
      <Text style={[styles.label, tone === "primary" || tone === "danger" ? styles.labelOnDark : styles.labelOnLight]}>{label}</Text>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: {
    minHeight: minTap,
    minWidth: minTap,
    paddingHorizontal: space.lg,
    borderRadius: radius.md,
    alignItems: "center",
    justifyContent: "center",
    flexDirection: "row",
    gap: space.sm,
    borderWidth: 1,
    borderColor: "transparent",
  },
  primary: { backgroundColor: colors.field },
  primaryActive: { backgroundColor: colors.fieldDark },
  secondary: { backgroundColor: colors.card, borderColor: colors.field },
  secondaryActive: { backgroundColor: colors.fieldTint },
  danger: { backgroundColor: colors.danger },
  dangerActive: { backgroundColor: "#7f1d20" },
  quiet: { backgroundColor: "transparent" },
  quietActive: { backgroundColor: colors.fieldTint },
  focused: { borderColor: colors.focus, borderWidth: 2 },
  disabled: { opacity: 0.55 },
  label: { fontFamily: fonts.semibold, fontSize: 15 },
  labelOnDark: { color: "#ffffff" },
  labelOnLight: { color: colors.fieldDark },
});
