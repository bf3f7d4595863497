import { Link } from "expo-router";
import { Pressable, StyleSheet } from "react-native";
import { AdminGate } from "@/components/account/admin-gate";
import { Card } from "@/components/ui/card";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, minTap, space } from "@/constants/theme";
import { useOutboxQuery } from "@/hooks/use-account";
import { ApiError } from "@/lib/api-error";

export default function OutboxScreen() {
  const outbox = useOutboxQuery();
  return (
    <AdminGate title="Outbox" subtitle="Every message Plotbank has recorded, newest first. None of them left this machine.">
      {outbox.isPending ? (
        <LoadingState label="Loading messages…" />
      ) : outbox.isError ? (
        outbox.error instanceof ApiError && outbox.error.status === 404 ? (
          <EmptyState title="No outbox here" hint="This server sends its mail by SMTP, so there is no outbox to read." />
        ) : (
          <ErrorState error={outbox.error} onRetry={() => outbox.refetch()} />
        )
      ) : outbox.data.items.length === 0 ? (
        <EmptyState title="No messages yet" />
      ) : (
        <Card>
          {outbox.data.items.map((m) => (
            <Link key={m.id} href={`/admin/outbox/${m.id}`} asChild>
              <Pressable role="link" style={styles.row}>
                <Text variant="subheading">{m.subject}</Text>
                <Text variant="caption">{`${m.to} · ${m.kind} · ${new Date(m.createdAt).toLocaleString()}`}</Text>
              </Pressable>
            </Link>
          ))}
        </Card>
      )}
    </AdminGate>
  );
}

const styles = StyleSheet.create({
  row: { minHeight: minTap, paddingVertical: space.sm, borderTopWidth: 1, borderTopColor: colors.line, gap: 2 },
});
