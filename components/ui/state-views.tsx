import { useEffect, useState } from "react";
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

/** Whole seconds from now to a time, counting down once a second. */
function useSecondsUntil(at: number): number {
  const [now, setNow] = useState(Date.now);
  useEffect(() => {
    const timer = setInterval(() => setNow(Date.now()), 1000);
    return () => clearInterval(timer);
  }, [at]);
  return Math.max(0, Math.ceil((at - now) / 1000));
}

/** The server said 429: the request is asked again by itself after its Retry-After; say so, and how long. */
export function BusyState({ error }: { error: ApiError }) {
  const seconds = useSecondsUntil(error.retryAt);
  return (
    <View style={styles.box} role="status" aria-live="polite" testID="busy">
      <ActivityIndicator color={colors.field} />
      <Text variant="subheading">{seconds > 0 ? `Busy — trying again in ${seconds} s` : "Busy — trying again now"}</Text>
      <Text variant="caption" style={styles.center}>
        Many requests have reached Plotbank from here in the last minute. Nothing needs doing: this page asks again by itself.
      </Text>
    </View>
  );
}

/** A failure is a 429 the retry policy is still waiting out (lib/query-client.ts). */
export const isBusy = (error: unknown): error is ApiError => error instanceof ApiError && error.busy;

/** Errors in words a user can act on; offline and busy are told apart from a server problem. */
export function ErrorState({ error, onRetry }: { error: unknown; onRetry?: () => void }) {
  const offline = error instanceof ApiError && error.offline;
  const busy = isBusy(error);
  const title = offline ? "You are offline" : busy ? "Busy" : "Something went wrong";
  const message = offline
    ? "Plotbank could not be reached. Check the connection; what you have open stays here."
    : busy
      ? "Plotbank is still getting too many requests from here. Wait a minute, then try again."
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
