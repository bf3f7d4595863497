import { Pressable, StyleSheet, View } from "react-native";
import { FieldError } from "@/components/ui/text-field";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, radius, space } from "@/constants/theme";

export interface Choice<T extends string> {
  value: T;
  label: string;
}

/**
 * A row of touch-friendly chips, the app's one choice control. `multiple` chips toggle (checkboxes to assistive
 * tech); otherwise they form a segmented control (radio buttons). Each is a focusable Pressable, so Tab moves through
 * them in reading order, and each is named "label: choice", so chips repeated down a list stay unambiguous. A form's
 * `error` sits under the chips.
 */
export function ChoiceChips<T extends string>({
  label,
  choices,
  selected,
  onToggle,
  multiple = false,
  testID,
  error,
}: {
  label: string;
  choices: readonly Choice<T>[];
  selected: readonly T[];
  onToggle: (value: T) => void;
  multiple?: boolean;
  testID?: string;
  error?: string;
}) {
  return (
    <View style={styles.group} role={multiple ? "group" : "radiogroup"} aria-label={label} testID={testID}>
      <Text variant="label">{label}</Text>
      <View style={styles.row}>
        {choices.map((choice) => {
          const on = selected.includes(choice.value);
          return (
            <Pressable
              key={choice.value}
              role={multiple ? "checkbox" : "radio"}
              aria-checked={on}
              accessibilityLabel={`${label}: ${choice.label}`}
              testID={testID ? `${testID}-${choice.value}` : undefined}
              onPress={() => onToggle(choice.value)}
              style={({ focused, hovered }: { pressed: boolean; focused?: boolean; hovered?: boolean }) => [
                styles.chip,
                on && styles.chipOn,
                hovered && !on && styles.chipHover,
                focused && styles.focused,
              ]}
            >
              <Text style={[styles.text, on && styles.textOn]}>{choice.label}</Text>
            </Pressable>
          );
        })}
      </View>
      {error ? <FieldError message={error} /> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  group: { gap: space.xs },
  row: { flexDirection: "row", flexWrap: "wrap", gap: space.sm },
  chip: {
    minHeight: minTap,
    minWidth: minTap,
    paddingHorizontal: space.md,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.line,
    backgroundColor: colors.card,
    alignItems: "center",
    justifyContent: "center",
  },
  chipOn: { backgroundColor: colors.field, borderColor: colors.field },
  chipHover: { backgroundColor: colors.fieldTint },
  focused: { borderColor: colors.focus, borderWidth: 2 },
  text: { fontFamily: fonts.medium, fontSize: 14, color: colors.ink },
  textOn: { color: "#ffffff" },
});
