import { AuthPanel, TextLink } from "@/components/account/auth-panel";
import { EmailLinkForm } from "@/components/account/resend-link-form";
import { Text } from "@/components/ui/text";
import { useForgotPasswordMutation } from "@/hooks/use-account";

export default function ForgotPasswordScreen() {
  const forgot = useForgotPasswordMutation();
  return (
    <AuthPanel title="Forgot password" footer={<TextLink href="/sign-in" label="Back to sign in" />}>
      <Text>Enter the address you sign in with. We will send a link to set a new password; it works once, for one hour.</Text>
      <EmailLinkForm mutation={forgot} actionLabel="Send the link" />
    </AuthPanel>
  );
}
