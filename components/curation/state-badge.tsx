import { StyleSheet, View } from "react-native";
import { Text } from "@/components/ui/text";
import { colors, fonts } from "@/constants/theme";
import type { VersionState } from "@/schemas/dataset";
import { versionStateLabels } from "@/constants/vocabulary";

const tones: Record<VersionState, { bg: string; fg: string }> = {
  draft: { bg: colors.wheatTint, fg: "#6b4a00" },
  in_review: { bg: colors.infoTint, fg: colors.info },
  published: { bg: colors.fieldTint, fg: colors.fieldDark },
  withdrawn: { bg: colors.dangerTint, fg: colors.danger },
};

export function StateBadge({ state }: { state: VersionState }) {
  const t = tones[state];
  return (
    <View style={[styles.badge, { backgroundColor: t.bg }]}>
      <Text style={[styles.text, { color: t.fg }]}>{versionStateLabels[state]}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  badge: { borderRadius: 12, paddingHorizontal: 10, paddingVertical: 3, alignSelf: "flex-start" },
  text: { fontFamily: fonts.semibold, fontSize: 13, lineHeight: 18 },
});
