import { useState } from "react";
import { Pressable, StyleSheet, View } from "react-native";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, space } from "@/constants/theme";

/** A heading that opens and closes its section; the state is announced as expanded/collapsed. */
export function Disclosure({
  title,
  hint,
  initiallyOpen = false,
  testID,
  children,
}: {
  title: string;
  hint?: string;
  initiallyOpen?: boolean;
  testID?: string;
  children: React.ReactNode;
}) {
  const [open, setOpen] = useState(initiallyOpen);
  return (
    <View style={styles.box}>
      <Pressable
        role="button"
        aria-expanded={open}
        // Named by its own words (title, then hint): an aria-label would have to repeat them exactly as axe reads
        // them across the two lines, which it joins without a space.
        testID={testID}
        onPress={() => setOpen((o) => !o)}
        style={({ focused }: { pressed: boolean; focused?: boolean }) => [styles.head, focused && styles.focused]}
      >
        <Text style={styles.chevron} aria-hidden>
          {open ? "▾" : "▸"}
        </Text>
        <View style={styles.titles}>
          <Text style={styles.title}>{title}</Text>
          {hint ? <Text variant="caption">{hint}</Text> : null}
        </View>
      </Pressable>
      {open ? <View style={styles.body}>{children}</View> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.sm },
  head: {
    minHeight: minTap,
    flexDirection: "row",
    alignItems: "center",
    gap: space.sm,
    borderRadius: 8,
    borderWidth: 2,
    borderColor: "transparent",
  },
  focused: { borderColor: colors.focus },
  chevron: { width: 18, color: colors.fieldDark, fontFamily: fonts.bold },
  titles: { flex: 1 },
  title: { fontFamily: fonts.semibold, fontSize: 16, color: colors.fieldDark },
  body: { gap: space.md },
});
