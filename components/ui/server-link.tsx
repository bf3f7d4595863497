import * as Linking from "expo-linking";
import { Platform, StyleSheet } from "react-native";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap } from "@/constants/theme";
import { apiUrl } from "@/lib/api-client";

/**
 * A plain link to something the server answers (a download, the API docs): an <a href> on the web, so the browser
 * leaves the app for it (it downloads, opens, and can be copied), and the system browser elsewhere.
 */
export function ServerLink({ href, label, testID }: { href: string; label: string; testID?: string }) {
  const url = apiUrl(href);
  const web = Platform.OS === "web" ? ({ href: url } as object) : {};
  return (
    <Text
      role="link"
      {...web}
      onPress={Platform.OS === "web" ? undefined : () => Linking.openURL(url)}
      style={styles.link}
      testID={testID}
      accessibilityLabel={label}
    >
      {label}
    </Text>
  );
}

const styles = StyleSheet.create({
  link: { minHeight: minTap, paddingVertical: 11, color: colors.info, fontFamily: fonts.medium, textDecorationLine: "underline" },
});
