import { StyleSheet, View } from "react-native";
import { Text } from "@/components/ui/text";
import { colors, radius, space } from "@/constants/theme";

/** The cautions every result carries, shown wherever the data turn into advice. */
export function Cautions({ cautions }: { cautions: string[] }) {
  return (
    <View style={styles.box} role="note" aria-label="Cautions" testID="cautions">
      <Text variant="subheading" style={{ color: colors.wheatText }}>Before you act on this</Text>
      {cautions.map((c) => (
        <Text key={c} variant="caption" style={styles.text}>• {c}</Text>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { backgroundColor: colors.wheatTint, borderRadius: radius.md, padding: space.md, gap: space.xs },
  text: { color: colors.ink },
});
