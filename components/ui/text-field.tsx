import { StyleSheet, TextInput, View, type TextInputProps } from "react-native";
import { colors, fonts, minTap, radius, space } from "@/constants/theme";
import { Text } from "@/components/ui/text";

export interface TextFieldProps extends Omit<TextInputProps, "style" | "onChange"> {
  label: string;
  value: string;
  onChangeText: (text: string) => void;
  error?: string;
  hint?: string;
}

/** A labelled text input whose error sits under it and is announced with it. */
export function TextField({ label, value, onChangeText, error, hint, multiline, ...props }: TextFieldProps) {
  return (
    <View style={styles.field}>
      <Text variant="label">{label}</Text>
      <TextInput
        accessibilityLabel={label}
        aria-invalid={error ? true : undefined}
        value={value}
        onChangeText={onChangeText}
        multiline={multiline}
        placeholderTextColor={colors.muted}
        style={[styles.input, multiline && styles.multiline, !!error && styles.inputError]}
        {...props}
      />
      {hint && !error ? <Text variant="caption">{hint}</Text> : null}
      {error ? <FieldError message={error} /> : null}
    </View>
  );
}

export function FieldError({ message }: { message: string }) {
  return (
    <Text variant="caption" role="alert" style={styles.error}>
      {message}
    </Text>
  );
}

const styles = StyleSheet.create({
  field: { gap: space.xs },
  input: {
    minHeight: minTap,
    borderWidth: 1,
    borderColor: colors.line,
    borderRadius: radius.sm,
    paddingHorizontal: space.md,
    paddingVertical: space.sm,
    backgroundColor: colors.card,
    color: colors.ink,
    fontFamily: fonts.regular,
    fontSize: 15,
  },
  multiline: { minHeight: 96, textAlignVertical: "top" },
  inputError: { borderColor: colors.danger, borderWidth: 2 },
  error: { color: colors.danger },
});
