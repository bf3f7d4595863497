import { useLocalSearchParams, useRouter } from "expo-router";
import { z } from "zod";
import { AuthPanel, TextLink } from "@/components/account/auth-panel";
import { Notice } from "@/components/account/notice";
import { TextField } from "@/components/ui/text-field";
import { Button } from "@/components/ui/button";
import { LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { useAcceptInvitationMutation, useInvitationQuery, useSignInMutation } from "@/hooks/use-account";
import { useAccountForm } from "@/hooks/use-account-form";
import { displayName, newPassword } from "@/schemas/account";

const acceptForm = z.object({ displayName, password: newPassword });

/** Accept an invitation: the invitee picks a name and password and is signed in with the invited role. */
export default function AcceptInvitationScreen() {
  const { token = "" } = useLocalSearchParams<{ token?: string }>();
  const router = useRouter();
  const invitation = useInvitationQuery(token);
  const accept = useAcceptInvitationMutation();
  const signIn = useSignInMutation();
  const form = useAccountForm(acceptForm, { displayName: "", password: "" });

  if (!token) {
    return (
      <AuthPanel title="Accept invitation">
        <Notice tone="error">This page needs the link from the invitation e-mail.</Notice>
      </AuthPanel>
    );
  }
  if (invitation.isPending)
    return (
      <AuthPanel title="Accept invitation">
        <LoadingState label="Checking the invitation…" />
      </AuthPanel>
    );
  if (invitation.isError) {
    return (
      <AuthPanel title="Accept invitation" footer={<TextLink href="/sign-in" label="Already have an account? Sign in" />}>
        <Notice tone="error" title="This invitation cannot be used">
          {invitation.error.message}
        </Notice>
      </AuthPanel>
    );
  }

  const submit = () => {
    const v = form.validate();
    if (!v) return;
    accept.mutate(
      { token, ...v },
      {
        onSuccess: (user) =>
          signIn.mutate(
            { email: user.email, password: v.password },
            { onSuccess: () => router.replace("/account"), onError: form.showServerError },
          ),
        onError: form.showServerError,
      },
    );
  };

  return (
    <AuthPanel title="Accept invitation" subtitle={`You are invited as a ${invitation.data.role}.`}>
      {form.formError ? <Notice tone="error">{form.formError}</Notice> : null}
      <Text>
        The account will be <Text style={{ fontWeight: "600" }}>{invitation.data.email}</Text>. Choose the name others see on your work, and
        a password.
      </Text>
      <TextField
        label="Your name"
        value={form.values.displayName}
        onChangeText={form.set("displayName")}
        error={form.errors.displayName}
        autoComplete="name"
      />
      <TextField
        label="Password"
        value={form.values.password}
        onChangeText={form.set("password")}
        error={form.errors.password}
        secureTextEntry
        autoComplete="new-password"
        hint="At least 12 characters."
        onSubmitEditing={submit}
      />
      <Button label="Accept and sign in" onPress={submit} busy={accept.isPending || signIn.isPending} />
    </AuthPanel>
  );
}
