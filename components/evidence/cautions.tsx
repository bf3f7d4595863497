import { StyleSheet, View } from "react-native";
import type { Caution } from "@/schemas/analysis";
import { Text } from "@/components/ui/text";
import { colors, radius, space } from "@/constants/theme";

/**
 * The cautions of a result, as the API evaluates them against the treatments the filters include: the rules a
 * treatment trips first (naming the treatments and how), then the standing cautions, then the rules nothing here trips.
 */
export function Cautions({ cautions }: { cautions: Caution[] }) {
  const matching = cautions.filter((c) => c.matches);
  const standing = cautions.filter((c) => !c.matches && c.standing);
  const untripped = cautions.filter((c) => !c.matches && !c.standing);
  return (
    <View style={styles.box} role="note" aria-label="Cautions" testID="cautions">
      <Text variant="subheading" style={{ color: colors.wheatText }}>
        Before you act on this
      </Text>
      {matching.map((c) => (
        <View key={c.code} style={styles.match} testID={`caution-${c.code}`}>
          <Text variant="caption" style={styles.strong}>
            • {c.text}
          </Text>
          {c.treatments.map((t) => (
            <Text key={`${t.dataset}/${t.treatment}/${t.detail}`} variant="caption" style={styles.text}>
              {"   "}
              {t.treatment} ({t.dataset}): {t.detail}
            </Text>
          ))}
          <Text variant="caption" style={styles.source}>
            {"   "}Source: {c.source}
          </Text>
        </View>
      ))}
      {standing.map((c) => (
        <Text key={c.code} variant="caption" style={styles.text} testID={`caution-${c.code}`}>
          • {c.text}
        </Text>
      ))}
      {untripped.length > 0 && (
        <Text variant="caption" style={styles.source} testID="cautions-untripped">
          Also checked, and no treatment here trips them: {untripped.map((c) => `${c.text} (${c.source})`).join(" ")}
        </Text>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { backgroundColor: colors.wheatTint, borderRadius: radius.md, padding: space.md, gap: space.xs },
  match: { gap: 2 },
  strong: { color: colors.ink, fontWeight: "600" },
  text: { color: colors.ink },
  source: { color: colors.wheatText },
});
