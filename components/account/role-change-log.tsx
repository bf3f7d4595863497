import { StyleSheet, View } from "react-native";
import { Card } from "@/components/ui/card";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { useRoleChangesQuery } from "@/hooks/use-account";

export function RoleChangeLog() {
  const log = useRoleChangesQuery();
  return (
    <Card>
      <Text variant="heading">Role changes</Text>
      <Text variant="caption">
        Every change of role, newest first, with who made it; an accepted invitation counts as one, made by the inviter.
      </Text>
      {log.isPending ? (
        <LoadingState label="Loading the log…" />
      ) : log.isError ? (
        <ErrorState error={log.error} onRetry={() => log.refetch()} />
      ) : log.data.items.length === 0 ? (
        <EmptyState title="No role changes yet" />
      ) : (
        log.data.items.map((c) => (
          <View key={c.id} style={styles.row}>
            <Text>
              {c.fromRole
                ? `${c.user.displayName}: ${c.fromRole} → ${c.toRole}`
                : `${c.user.displayName}: joined as ${c.toRole} by invitation`}
            </Text>
            <Text variant="caption">{`${new Date(c.at).toLocaleString()} · by ${c.actor?.displayName ?? "a removed account"}`}</Text>
          </View>
        ))
      )}
    </Card>
  );
}

const styles = StyleSheet.create({ row: { borderTopWidth: 1, borderTopColor: colors.line, paddingTop: space.sm } });
