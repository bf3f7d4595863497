import { useLocalSearchParams, useRouter, type Href } from "expo-router";
import { AuthPanel, TextLink } from "@/components/account/auth-panel";
import { Notice } from "@/components/account/notice";
import { TextField } from "@/components/ui/text-field";
import { Button } from "@/components/ui/button";
import { useSignInMutation } from "@/hooks/use-account";
import { useAccountForm } from "@/hooks/use-account-form";
import { signInBody } from "@/schemas/account";

/** Only paths inside the app may be returned to after signing in (never another site). */
/** Where to go after signing in: a path of ours from `?next=` (checked here, so only known at run time), else the account. */
const safeNext = (next: unknown): Href =>
  typeof next === "string" && next.startsWith("/") && !next.startsWith("//") ? (next as Href) : "/account";

export default function SignInScreen() {
  const params = useLocalSearchParams<{ next?: string; email?: string }>();
  const router = useRouter();
  const form = useAccountForm(signInBody, { email: typeof params.email === "string" ? params.email : "", password: "" });
  const signIn = useSignInMutation();

  const submit = () => {
    const body = form.validate();
    if (!body) return;
    signIn.mutate(body, { onSuccess: () => router.replace(safeNext(params.next)), onError: form.showServerError });
  };

  return (
    <AuthPanel
      title="Sign in"
      subtitle="Curators, reviewers and members sign in here. Reading published data needs no account."
      footer={
        <>
          <TextLink href="/forgot-password" label="Forgot your password?" />
          <TextLink href="/sign-up" label="New here? Create an account" />
        </>
      }
    >
      {form.formError ? <Notice tone="error">{form.formError}</Notice> : null}
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
        secureTextEntry
        autoComplete="current-password"
        onSubmitEditing={submit}
      />
      <Button label="Sign in" onPress={submit} busy={signIn.isPending} />
    </AuthPanel>
  );
}
