import * as Clipboard from "expo-clipboard";
import { useState } from "react";
import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Text } from "@/components/ui/text";
import { colors, radius, space } from "@/constants/theme";
import { curlCommand } from "@/lib/share-link";
import { Disclosure } from "./disclosure";

function CopyRow({ label, text, testID }: { label: string; text: string; testID: string }) {
  const [copied, setCopied] = useState(false);
  return (
    <View style={styles.row}>
      <Text variant="mono" selectable style={styles.code} testID={testID}>
        {text}
      </Text>
      <Button
        label={copied ? "Copied" : `Copy ${label}`}
        tone="secondary"
        accessibilityLabel={`Copy the ${label}`}
        testID={`${testID}-copy`}
        onPress={async () => {
          await Clipboard.setStringAsync(text);
          setCopied(true);
          setTimeout(() => setCopied(false), 2000);
        }}
      />
    </View>
  );
}

/** The same numbers from the open API: the equivalent URL and a curl line. */
export function ApiLinkPanel({ apiUrl }: { apiUrl: string }) {
  return (
    <Disclosure title="Get this from the API" hint="The same numbers, for R, Python or a spreadsheet" testID="api-toggle">
      <CopyRow label="URL" text={apiUrl} testID="api-url" />
      <CopyRow label="curl line" text={curlCommand(apiUrl)} testID="api-curl" />
      <CopyRow label="CSV URL" text={`${apiUrl}${apiUrl.includes("?") ? "&" : "?"}format=csv`} testID="api-csv" />
      <Text variant="caption">
        Your prices are not in these links. A script can add price= ($/bu) and cost= ($/ac) to get the break-even numbers in the answer.
      </Text>
    </Disclosure>
  );
}

export { CopyRow };

const styles = StyleSheet.create({
  row: { gap: space.sm },
  // Long URLs break anywhere rather than widen the page.
  code: {
    backgroundColor: colors.paper,
    borderRadius: radius.sm,
    padding: space.sm,
    borderWidth: 1,
    borderColor: colors.line,
    wordBreak: "break-all",
  } as object,
});
