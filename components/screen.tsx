import { ScrollView, StyleSheet, View } from "react-native";
import { space } from "@/constants/theme";
import { useLayout } from "@/hooks/use-layout";
import { PageHead } from "./page-head";
import { Text } from "./ui/text";

/**
 * A scrolling page with a title; content is capped in width on wide screens so lines stay readable. The title is
 * the screen's one h1 and names the document; `documentTitle` and `description` (default: the subtitle) override
 * what the browser tab and search results show.
 */
export function Screen({
  title,
  subtitle,
  documentTitle,
  description,
  children,
  maxWidth = 1100,
}: {
  title: string;
  subtitle?: string;
  documentTitle?: string;
  description?: string;
  children: React.ReactNode;
  maxWidth?: number;
}) {
  const { wide } = useLayout();
  return (
    <ScrollView contentContainerStyle={[styles.scroll, { padding: wide ? space.xl : space.lg }]}>
      <PageHead title={documentTitle ?? title} description={description ?? subtitle} />
      <View style={[styles.inner, { maxWidth }]}>
        <Text variant="title" aria-level={1}>
          {title}
        </Text>
        {subtitle ? <Text variant="caption">{subtitle}</Text> : null}
        {children}
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  scroll: { flexGrow: 1 },
  inner: { width: "100%", alignSelf: "center", gap: space.lg },
});
