import { StyleSheet, View } from "react-native";
import { Notice } from "@/components/account/notice";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { Card } from "@/components/ui/card";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { useAdminUsersQuery, useChangeRoleMutation } from "@/hooks/use-account";
import { roleLabels, roles } from "@/constants/vocabulary";

const roleOptions = roles.map((value) => ({ value, label: roleLabels[value] }));

export function PeopleList() {
  const users = useAdminUsersQuery();
  const change = useChangeRoleMutation();
  return (
    <Card>
      <Text variant="heading">People</Text>
      {change.isError ? (
        <Notice tone="error" title="The role was not changed">
          {change.error.message}
        </Notice>
      ) : null}
      {users.isPending ? (
        <LoadingState label="Loading people…" />
      ) : users.isError ? (
        <ErrorState error={users.error} onRetry={() => users.refetch()} />
      ) : (
        users.data.items.map((u) => (
          <View key={u.id} style={styles.row} accessibilityLabel={`${u.displayName}, ${u.role}`}>
            <Text variant="subheading">{u.displayName}</Text>
            <Text variant="caption">
              {u.email}
              {u.emailVerified ? "" : " · not confirmed"}
              {u.disabled ? " · disabled" : ""}
            </Text>
            <ChoiceChips
              label={`Role of ${u.displayName}`}
              choices={roleOptions}
              selected={[u.role]}
              onToggle={(role) => {
                if (role !== u.role) change.mutate({ userId: u.id, role });
              }}
            />
          </View>
        ))
      )}
    </Card>
  );
}

const styles = StyleSheet.create({
  row: { gap: space.xs, borderTopWidth: 1, borderTopColor: colors.line, paddingTop: space.md },
});
