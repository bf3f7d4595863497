import { StyleSheet, View } from "react-native";
import { Text } from "@/components/ui/text";
import { colors, radius, space } from "@/constants/theme";

/** A message above a form: a problem (announced at once) or a confirmation (announced politely). */
export function Notice({ tone, title, children }: { tone: "error" | "success" | "info"; title?: string; children?: React.ReactNode }) {
  return (
    <View
      role={tone === "error" ? "alert" : "status"}
      aria-live={tone === "error" ? "assertive" : "polite"}
      style={[styles.box, styles[tone]]}
    >
      {title ? (
        <Text variant="subheading" style={tone === "error" ? styles.errorText : undefined}>
          {title}
        </Text>
      ) : null}
      {typeof children === "string" ? <Text>{children}</Text> : children}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { borderRadius: radius.md, padding: space.md, gap: space.xs, borderWidth: 1 },
  error: { backgroundColor: colors.dangerTint, borderColor: colors.danger },
  success: { backgroundColor: colors.fieldTint, borderColor: colors.field },
  info: { backgroundColor: colors.infoTint, borderColor: colors.info },
  errorText: { color: colors.danger },
});
