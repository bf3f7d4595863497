import { Pressable, StyleSheet, View } from "react-native";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, space } from "@/constants/theme";

/** A row of tabs switching panels on one screen. */
export function SegmentTabs<T extends string>({
  tabs,
  value,
  onChange,
  label,
}: {
  tabs: readonly { value: T; label: string }[];
  value: T;
  onChange: (v: T) => void;
  label: string;
}) {
  return (
    <View role="tablist" accessibilityLabel={label} style={styles.bar}>
      {tabs.map((t) => (
        <Pressable
          key={t.value}
          role="tab"
          aria-selected={t.value === value}
          accessibilityLabel={t.label}
          onPress={() => onChange(t.value)}
          style={StyleSheet.flatten([styles.tab, t.value === value && styles.tabOn])}
        >
          <Text style={[styles.text, t.value === value && styles.textOn]}>{t.label}</Text>
        </Pressable>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  bar: { flexDirection: "row", flexWrap: "wrap", borderBottomWidth: 1, borderBottomColor: colors.line, gap: space.xs },
  tab: { minHeight: minTap, paddingHorizontal: space.lg, justifyContent: "center", borderBottomWidth: 3, borderBottomColor: "transparent" },
  tabOn: { borderBottomColor: colors.field },
  text: { fontFamily: fonts.medium, color: colors.muted },
  textOn: { fontFamily: fonts.semibold, color: colors.fieldDark },
});
