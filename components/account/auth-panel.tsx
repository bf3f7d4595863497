import { Link, type Href } from "expo-router";
import { Pressable, StyleSheet, View } from "react-native";
import { Screen } from "@/components/screen";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, space } from "@/constants/theme";

/** The narrow single-card page the sign-in family of screens share; a form stays readable on any width. */
export function AuthPanel({
  title,
  subtitle,
  children,
  footer,
}: {
  title: string;
  subtitle?: string;
  children: React.ReactNode;
  footer?: React.ReactNode;
}) {
  return (
    <Screen title={title} subtitle={subtitle} maxWidth={480}>
      <Card style={styles.card}>{children}</Card>
      {footer ? <View style={styles.footer}>{footer}</View> : null}
    </Screen>
  );
}

/** A text link with a 44 px target. */
export function TextLink({ href, label }: { href: Href; label: string }) {
  return (
    <Link href={href} asChild>
      <Pressable role="link" accessibilityLabel={label} style={styles.link}>
        <Text style={styles.linkText}>{label}</Text>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  card: { gap: space.md },
  footer: { gap: space.xs },
  link: { minHeight: minTap, justifyContent: "center" },
  linkText: { color: colors.info, fontFamily: fonts.medium, textDecorationLine: "underline" },
});
