import { useState } from "react";
import { Notice } from "@/components/account/notice";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { TextField } from "@/components/ui/text-field";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { useInvitationsQuery, useInviteMutation } from "@/hooks/use-account";
import { useAccountForm } from "@/hooks/use-account-form";
import { emailOnlyBody } from "@/schemas/account";

import { roleLabels, staffRoles } from "@/constants/vocabulary";

type InvitedRole = (typeof staffRoles)[number];
const roles = staffRoles.map((value) => ({ value, label: roleLabels[value] }));

export function InviteForm() {
  const form = useAccountForm(emailOnlyBody, { email: "" });
  const [role, setRole] = useState<InvitedRole>("curator");
  const invite = useInviteMutation();
  const open = useInvitationsQuery();
  const submit = () => {
    const v = form.validate();
    if (v) invite.mutate({ email: v.email, role }, { onSuccess: () => form.reset(), onError: form.showServerError });
  };
  return (
    <Card>
      <Text variant="heading">Invite someone</Text>
      <Text variant="caption">They get an e-mail with a link, valid for 7 days, to choose a name and password.</Text>
      {invite.isSuccess ? <Notice tone="success">{`Invitation sent to ${invite.data.email}.`}</Notice> : null}
      {form.formError ? <Notice tone="error">{form.formError}</Notice> : null}
      <TextField
        label="E-mail"
        value={form.values.email}
        onChangeText={form.set("email")}
        error={form.errors.email}
        autoCapitalize="none"
        keyboardType="email-address"
        inputMode="email"
      />
      <ChoiceChips label="Role" choices={roles} selected={[role]} onToggle={setRole} />
      <Button label="Send invitation" onPress={submit} busy={invite.isPending} />
      {open.data && open.data.items.length > 0 ? (
        <>
          <Text variant="subheading">Waiting to be accepted</Text>
          {open.data.items.map((i) => (
            <Text key={i.id} variant="caption">{`${i.email} · ${i.role} · until ${new Date(i.expiresAt).toLocaleDateString()}`}</Text>
          ))}
        </>
      ) : null}
    </Card>
  );
}
