import { ActivityIndicator, StyleSheet, View } from "react-native";
import { colors, space } from "@/constants/theme";
import { ApiError } from "@/lib/api-error";
import { Button } from "./button";
import { Text } from "./text";

export function LoadingState({ label = "Loading…" }: { label?: string }) {
  return (
    <View style={styles.box} role="status" aria-live="polite" accessibilityLabel={label}>
      <ActivityIndicator color={colors.field} />
      <Text variant="caption">{label}</Text>
    </View>
  );
}

export function EmptyState({ title, hint, action }: { title: string; hint?: string; action?: React.ReactNode }) {
  return (
    <View style={styles.box} role="status">
      <Text variant="subheading">{title}</Text>
      {hint ? (
        <Text variant="caption" style={styles.center}>
          {hint}
        </Text>
      ) : null}
      {action}
    </View>
  );
}

/** Errors in words a user can act on; offline is told apart from a server problem. */
export function ErrorState({ error, onRetry }: { error: unknown; onRetry?: () => void }) {
  const offline = error instanceof ApiError && error.offline;
  const title = offline ? "You are offline" : "Something went wrong";
  const message = offline
    ? "Plotbank could not be reached. Check the connection; what you have open stays here."
    : error instanceof Error
      ? error.message
      : "The request failed.";
  return (
    <View style={[styles.box, styles.error]} role="alert">
      <Text variant="subheading" style={{ color: colors.danger }}>
        {title}
      </Text>
      <Text style={styles.center}>{message}</Text>
      {onRetry ? <Button label="Try again" tone="secondary" onPress={onRetry} /> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { padding: space.xl, alignItems: "center", justifyContent: "center", gap: space.sm },
  error: { backgroundColor: colors.dangerTint, borderRadius: 12 },
  center: { textAlign: "center" },
});
