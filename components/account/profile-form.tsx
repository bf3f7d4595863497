import { useState } from "react";
import { z } from "zod";
import { Notice } from "@/components/account/notice";
import { TextField } from "@/components/ui/text-field";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { useProfileMutation } from "@/hooks/use-account";
import { useAccountForm } from "@/hooks/use-account-form";
import { displayName, newPassword, type Me } from "@/schemas/account";

const nameForm = z.object({ displayName });
const passwordForm = z.object({ currentPassword: z.string().min(1, "Enter your current password."), newPassword });

export function ProfileForm({ me }: { me: Me }) {
  const name = useAccountForm(nameForm, { displayName: me.displayName });
  const password = useAccountForm(passwordForm, { currentPassword: "", newPassword: "" });
  const saveName = useProfileMutation();
  const savePassword = useProfileMutation();
  const [passwordChanged, setPasswordChanged] = useState(false);

  return (
    <>
      <Card>
        <Text variant="heading">Profile</Text>
        <Text variant="caption">{`${me.email} · ${me.role}`}</Text>
        {saveName.isSuccess ? <Notice tone="success">Name saved.</Notice> : null}
        {name.formError ? <Notice tone="error">{name.formError}</Notice> : null}
        <TextField
          label="Your name"
          value={name.values.displayName}
          onChangeText={name.set("displayName")}
          error={name.errors.displayName}
          autoComplete="name"
        />
        <Button
          label="Save name"
          tone="secondary"
          busy={saveName.isPending}
          onPress={() => {
            const v = name.validate();
            if (v) saveName.mutate(v, { onError: name.showServerError });
          }}
        />
      </Card>
      <Card>
        <Text variant="heading">Password</Text>
        <Text variant="caption">
          Changing it signs you out on every other device and revokes your API tokens; you are e-mailed about it.
        </Text>
        {passwordChanged ? <Notice tone="success">Password changed.</Notice> : null}
        {password.formError ? <Notice tone="error">{password.formError}</Notice> : null}
        <TextField
          label="Current password"
          value={password.values.currentPassword}
          onChangeText={password.set("currentPassword")}
          error={password.errors.currentPassword}
          secureTextEntry
          autoComplete="current-password"
        />
        <TextField
          label="New password"
          value={password.values.newPassword}
          onChangeText={password.set("newPassword")}
          error={password.errors.newPassword}
          secureTextEntry
          autoComplete="new-password"
          hint="At least 12 characters."
        />
        <Button
          label="Change password"
          tone="secondary"
          busy={savePassword.isPending}
          onPress={() => {
            const v = password.validate();
            setPasswordChanged(false);
            if (v)
              savePassword.mutate(v, {
                onSuccess: () => {
                  password.reset();
                  setPasswordChanged(true);
                },
                onError: password.showServerError,
              });
          }}
        />
      </Card>
    </>
  );
}
