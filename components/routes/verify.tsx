import { useLocalSearchParams } from "expo-router";
import { useEffect, useRef } from "react";
import { AuthPanel, TextLink } from "@/components/account/auth-panel";
import { Notice } from "@/components/account/notice";
import { EmailLinkForm } from "@/components/account/resend-link-form";
import { LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { useResendVerificationMutation, useVerifyEmailMutation } from "@/hooks/use-account";

/** Where the confirmation link lands: it confirms at once; without a token it explains and offers a new link. */
export default function VerifyScreen() {
  const { token } = useLocalSearchParams<{ token?: string }>();
  const verify = useVerifyEmailMutation();
  const resend = useResendVerificationMutation();
  const sent = useRef(false);

  useEffect(() => {
    // Once only: the link is single-use, and a second call would report it as already used.
    if (typeof token === "string" && token && !sent.current) {
      sent.current = true;
      verify.mutate(token);
    }
  }, [token, verify]);

  if (verify.isSuccess) {
    return (
      <AuthPanel title="Address confirmed">
        <Notice tone="success" title="You can sign in now">{`${verify.data.email} is confirmed.`}</Notice>
        <TextLink href={`/sign-in?email=${encodeURIComponent(verify.data.email)}`} label="Go to sign in" />
      </AuthPanel>
    );
  }
  if (token && (verify.isPending || verify.isIdle)) {
    return (
      <AuthPanel title="Confirming your address">
        <LoadingState label="Confirming your e-mail address…" />
      </AuthPanel>
    );
  }
  return (
    <AuthPanel title="Check your e-mail" footer={<TextLink href="/sign-in" label="Back to sign in" />}>
      {verify.isError ? (
        <Notice tone="error" title="This link did not work">
          {verify.error.message}
        </Notice>
      ) : (
        <Text>Open the link we sent to confirm your address. If it did not arrive, we can send a new one.</Text>
      )}
      <EmailLinkForm mutation={resend} actionLabel="Send a new link" />
    </AuthPanel>
  );
}
