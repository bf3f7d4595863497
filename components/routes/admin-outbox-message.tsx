import { Link, useLocalSearchParams, type Href } from "expo-router";
import { Pressable, StyleSheet } from "react-native";
import { AdminGate } from "@/components/account/admin-gate";
import { TextLink } from "@/components/account/auth-panel";
import { Card } from "@/components/ui/card";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap } from "@/constants/theme";
import { useOutboxMessageQuery } from "@/hooks/use-account";

/** A link to this app opens in place (client-side); any other address is a plain external link. */
/** A link from a message body: our own pages open in the app, anything else leaves it. Only known at run time. */
function hrefOf(link: string): Href {
  if (typeof window === "undefined") return link as Href;
  const url = new URL(link);
  return (url.origin === window.location.origin ? `${url.pathname}${url.search}` : link) as Href;
}

export default function OutboxMessageScreen() {
  const { id = "" } = useLocalSearchParams<{ id: string }>();
  const message = useOutboxMessageQuery(id);
  return (
    <AdminGate title="Message">
      <TextLink href="/admin/outbox" label="Back to the outbox" />
      {message.isPending ? (
        <LoadingState />
      ) : message.isError ? (
        <ErrorState error={message.error} onRetry={() => message.refetch()} />
      ) : (
        <Card>
          <Text variant="heading">{message.data.subject}</Text>
          <Text variant="caption">{`To ${message.data.to} · ${message.data.kind} · ${new Date(message.data.createdAt).toLocaleString()} · ${message.data.transport}`}</Text>
          <Text style={styles.body} selectable>
            {message.data.text}
          </Text>
          {message.data.links.length ? <Text variant="subheading">Links</Text> : null}
          {message.data.links.map((link) => (
            <Link key={link} href={hrefOf(link)} asChild>
              <Pressable role="link" accessibilityLabel={`Open ${link}`} style={styles.link}>
                <Text style={styles.linkText}>{link}</Text>
              </Pressable>
            </Link>
          ))}
        </Card>
      )}
    </AdminGate>
  );
}

const styles = StyleSheet.create({
  body: { fontFamily: fonts.regular },
  link: { minHeight: minTap, justifyContent: "center" },
  linkText: { color: colors.info, textDecorationLine: "underline", fontFamily: fonts.medium },
});
