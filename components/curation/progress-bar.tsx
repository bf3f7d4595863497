import { StyleSheet, View } from "react-native";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";

/** Upload progress, announced as a progressbar with its percentage. */
export function ProgressBar({ fraction, label }: { fraction: number; label: string }) {
  const pct = Math.round(Math.max(0, Math.min(1, fraction)) * 100);
  return (
    <View style={styles.box}>
      <View role="progressbar" accessibilityLabel={label} aria-valuemin={0} aria-valuemax={100} aria-valuenow={pct} style={styles.track}>
        <View style={[styles.fill, { width: `${pct}%` }]} />
      </View>
      <Text variant="caption">
        {label}: {pct} %
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.xs },
  track: { height: 12, borderRadius: 6, backgroundColor: colors.fieldTint, overflow: "hidden", borderWidth: 1, borderColor: colors.line },
  fill: { height: "100%", backgroundColor: colors.field },
});
