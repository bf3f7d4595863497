import { AuthPanel, TextLink } from "@/components/account/auth-panel";
import { Notice } from "@/components/account/notice";
import { TextField } from "@/components/ui/text-field";
import { Button } from "@/components/ui/button";
import { Text } from "@/components/ui/text";
import { useSignUpMutation } from "@/hooks/use-account";
import { useAccountForm } from "@/hooks/use-account-form";
import { signUpBody } from "@/schemas/account";

export default function CreateAccountScreen() {
  const form = useAccountForm(signUpBody, { displayName: "", email: "", password: "" });
  const signUp = useSignUpMutation();

  const submit = () => {
    const body = form.validate();
    if (body) signUp.mutate(body, { onError: form.showServerError });
  };

  if (signUp.isSuccess) {
    return (
      <AuthPanel title="Check your e-mail" footer={<TextLink href="/verify" label="No message? Send the link again" />}>
        <Notice tone="success" title="One more step">
          {`We sent a link to ${form.values.email}. Open it to confirm the address, then sign in.`}
        </Notice>
        <Text variant="caption">
          The link works once, for 48 hours. Look in the spam folder if it does not arrive within a few minutes.
        </Text>
      </AuthPanel>
    );
  }

  return (
    <AuthPanel
      title="Create account"
      subtitle="A member account lets you save queries, follow datasets and make API tokens. Curators are invited by an admin."
      footer={<TextLink href="/sign-in" label="Already have an account? Sign in" />}
    >
      {form.formError ? <Notice tone="error">{form.formError}</Notice> : null}
      <TextField
        label="Your name"
        value={form.values.displayName}
        onChangeText={form.set("displayName")}
        error={form.errors.displayName}
        autoComplete="name"
      />
      <TextField
        label="E-mail"
        value={form.values.email}
        onChangeText={form.set("email")}
        error={form.errors.email}
        autoComplete="email"
        keyboardType="email-address"
        autoCapitalize="none"
        inputMode="email"
      />
      <TextField
        label="Password"
        value={form.values.password}
        onChangeText={form.set("password")}
        error={form.errors.password}
        hint="At least 12 characters. Common and easily guessed passwords are refused; a few unrelated words are easy to remember and hard to guess."
        secureTextEntry
        autoComplete="new-password"
        onSubmitEditing={submit}
      />
      <Button label="Create account" onPress={submit} busy={signUp.isPending} />
    </AuthPanel>
  );
}
