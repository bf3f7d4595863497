import { Notice } from "@/components/account/notice";
import { TextField } from "@/components/ui/text-field";
import { Button } from "@/components/ui/button";
import { useAccountForm } from "@/hooks/use-account-form";
import { emailOnlyBody, type CheckEmail } from "@/schemas/account";
import type { UseMutationResult } from "@tanstack/react-query";

/** Ask for a link by e-mail address: a new confirmation link, or a password link. */
export function EmailLinkForm({ mutation, actionLabel }: { mutation: UseMutationResult<CheckEmail, Error, string>; actionLabel: string }) {
  const form = useAccountForm(emailOnlyBody, { email: "" });
  const submit = () => {
    const body = form.validate();
    if (body) mutation.mutate(body.email, { onError: form.showServerError });
  };
  if (mutation.isSuccess)
    return (
      <Notice tone="success" title="Check your e-mail">
        {mutation.data.message}
      </Notice>
    );
  return (
    <>
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
        onSubmitEditing={submit}
      />
      <Button label={actionLabel} onPress={submit} busy={mutation.isPending} />
    </>
  );
}
