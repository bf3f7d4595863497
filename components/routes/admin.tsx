import { View } from "react-native";
import { AdminGate } from "@/components/account/admin-gate";
import { TextLink } from "@/components/account/auth-panel";
import { FailedJobs } from "@/components/account/failed-jobs";
import { InviteForm } from "@/components/account/invite-form";
import { PeopleList } from "@/components/account/people-list";
import { RoleChangeLog } from "@/components/account/role-change-log";
import { space } from "@/constants/theme";
import { useInvitationsQuery } from "@/hooks/use-account";
import { useLayout } from "@/hooks/use-layout";

export default function PeopleAndRolesScreen() {
  const { wide } = useLayout();
  return (
    <AdminGate title="People & roles" subtitle="Who can curate, review and administer Plotbank.">
      <OutboxLink />
      <View style={{ flexDirection: wide ? "row" : "column", gap: space.lg, alignItems: wide ? "flex-start" : "stretch" }}>
        <View style={wide ? { flex: 3, gap: space.lg } : { gap: space.lg, alignSelf: "stretch" }}>
          <PeopleList />
        </View>
        <View style={wide ? { flex: 2, gap: space.lg } : { gap: space.lg, alignSelf: "stretch" }}>
          <InviteForm />
          <RoleChangeLog />
          <FailedJobs />
        </View>
      </View>
    </AdminGate>
  );
}

/** Where mail goes out by SMTP there is no outbox to read, so no link to one (the invitations payload says which). */
function OutboxLink() {
  const available = useInvitationsQuery().data?.outboxAvailable === true;
  return available ? <TextLink href="/admin/outbox" label="Outbox (mail kept here, not sent)" /> : null;
}
