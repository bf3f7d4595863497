import { useLocalSearchParams } from "expo-router";
import { z } from "zod";
import { AuthPanel, TextLink } from "@/components/account/auth-panel";
import { Notice } from "@/components/account/notice";
import { TextField } from "@/components/ui/text-field";
import { Button } from "@/components/ui/button";
import { useResetPasswordMutation } from "@/hooks/use-account";
import { useAccountForm } from "@/hooks/use-account-form";
import { newPassword } from "@/schemas/account";

const form = z
  .object({ password: newPassword, repeat: z.string() })
  .refine((v) => v.password === v.repeat, { path: ["repeat"], message: "The two passwords differ." });

export default function SetNewPasswordScreen() {
  const { token } = useLocalSearchParams<{ token?: string }>();
  const f = useAccountForm(form, { password: "", repeat: "" });
  const reset = useResetPasswordMutation();

  if (!token) {
    return (
      <AuthPanel title="Set a new password" footer={<TextLink href="/forgot-password" label="Ask for a password link" />}>
        <Notice tone="error">This page needs the link from the password e-mail.</Notice>
      </AuthPanel>
    );
  }
  if (reset.isSuccess) {
    return (
      <AuthPanel title="Password changed">
        <Notice tone="success" title="Sign in with the new password">
          You were signed out everywhere else.
        </Notice>
        <TextLink href="/sign-in" label="Go to sign in" />
      </AuthPanel>
    );
  }
  const submit = () => {
    const v = f.validate();
    if (v) reset.mutate({ token, password: v.password }, { onError: f.showServerError });
  };
  return (
    <AuthPanel title="Set a new password" footer={<TextLink href="/forgot-password" label="Link expired? Ask for a new one" />}>
      {f.formError ? (
        <Notice tone="error" title="The password was not changed">
          {f.formError}
        </Notice>
      ) : null}
      <TextField
        label="New password"
        value={f.values.password}
        onChangeText={f.set("password")}
        error={f.errors.password}
        secureTextEntry
        autoComplete="new-password"
        hint="At least 12 characters."
      />
      <TextField
        label="New password again"
        value={f.values.repeat}
        onChangeText={f.set("repeat")}
        error={f.errors.repeat}
        secureTextEntry
        autoComplete="new-password"
        onSubmitEditing={submit}
      />
      <Button label="Set the new password" onPress={submit} busy={reset.isPending} />
    </AuthPanel>
  );
}
