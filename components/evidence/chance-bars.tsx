import { StyleSheet, View } from "react-native";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { formatPercent } from "./format";

export interface ChanceBar {
  label: string;
  value: number | null;
  /** Predictive chances are solid; observed shares are hatched in words ("observed") and drawn lighter. */
  kind: "predictive" | "observed";
}

/**
 * Two or more percentages on one 0–100 % scale, so a predictive chance and an observed share can be compared by eye.
 * Each bar's number is written beside it; the whole is one image to a screen reader, read as its label.
 */
export function ChanceBars({ bars, testID }: { bars: ChanceBar[]; testID?: string }) {
  const summary = bars.map((b) => `${b.label}: ${formatPercent(b.value)}`).join("; ");
  return (
    <View style={styles.box} role="img" aria-label={`On one scale from 0 to 100 %: ${summary}`} testID={testID}>
      {bars.map((b) => (
        <View key={b.label} style={styles.row}>
          <View style={styles.head}>
            <Text variant="caption" style={styles.label}>
              {b.label}
            </Text>
            <Text variant="caption" style={styles.value}>
              {formatPercent(b.value)}
            </Text>
          </View>
          <View style={styles.track}>
            {b.value !== null ? (
              <View
                style={[
                  styles.fill,
                  b.kind === "observed" && styles.fillObserved,
                  { width: `${Math.max(0, Math.min(1, b.value)) * 100}%` },
                ]}
              />
            ) : null}
            <View style={styles.half} />
          </View>
        </View>
      ))}
      <View style={styles.axis}>
        {["0 %", "50 %", "100 %"].map((t) => (
          <Text key={t} variant="caption">
            {t}
          </Text>
        ))}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.sm, paddingTop: space.xs },
  row: { gap: 2 },
  head: { flexDirection: "row", justifyContent: "space-between", gap: space.sm },
  label: { flexShrink: 1, color: colors.ink },
  value: { color: colors.ink, fontVariant: ["tabular-nums"], flexShrink: 0 },
  track: { height: 12, borderRadius: 6, backgroundColor: colors.paper, borderWidth: 1, borderColor: colors.muted, overflow: "hidden" },
  fill: { height: "100%", backgroundColor: colors.field },
  fillObserved: { backgroundColor: colors.wheat },
  half: { position: "absolute", left: "50%", top: 0, bottom: 0, width: 1, backgroundColor: colors.muted },
  axis: { flexDirection: "row", justifyContent: "space-between" },
});
