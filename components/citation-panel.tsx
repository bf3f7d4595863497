import * as Clipboard from "expo-clipboard";
import { useEffect, useState } from "react";
import { Pressable, ScrollView, StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, radius, space } from "@/constants/theme";
import { citationFormatOptions, useCitation, type CitationFormat } from "@/hooks/use-citation";

/**
 * "Cite this version": the citation of one published version in the format a reader's reference manager takes,
 * with a copy button. The text is selectable too, for browsers that refuse clipboard access.
 */
export function CitationPanel({ slug, semver }: { slug: string; semver: string }) {
  const [format, setFormat] = useState<CitationFormat>("text");
  const [copied, setCopied] = useState<"done" | "failed" | null>(null);
  const citation = useCitation(slug, semver, format);

  useEffect(() => {
    if (!copied) return;
    const timer = setTimeout(() => setCopied(null), 2500);
    return () => clearTimeout(timer);
  }, [copied]);

  const copy = async () => {
    if (!citation.data) return;
    try {
      await Clipboard.setStringAsync(citation.data.trimEnd());
      setCopied("done");
    } catch {
      setCopied("failed");
    }
  };
  const label = citationFormatOptions.find((o) => o.format === format)!.label;

  return (
    <Card accessibilityLabel="Cite this version" testID="citation-panel">
      <Text variant="heading">Cite this version</Text>
      <Text variant="caption">Version {semver}. Cite the version you used, so others can reuse the same data.</Text>
      <View role="radiogroup" accessibilityLabel="Citation format" style={styles.formats}>
        {citationFormatOptions.map((o) => {
          const selected = o.format === format;
          return (
            <Pressable
              key={o.format}
              role="radio"
              aria-checked={selected}
              accessibilityState={{ selected }}
              accessibilityLabel={o.label}
              onPress={() => setFormat(o.format)}
              style={[styles.format, selected && styles.formatSelected]}
            >
              <Text style={[styles.formatLabel, selected && styles.formatLabelSelected]}>{o.label}</Text>
            </Pressable>
          );
        })}
      </View>
      {citation.isPending ? (
        <LoadingState label="Loading the citation…" />
      ) : citation.isError ? (
        <ErrorState error={citation.error} onRetry={() => citation.refetch()} />
      ) : (
        <ScrollView horizontal={format !== "text"} style={styles.box} contentContainerStyle={styles.boxContent}>
          <Text selectable testID="citation-text" variant={format === "text" ? "body" : "mono"} accessibilityLabel={`${label} citation`}>
            {/* BibTeX indents with tabs, which a phone shows eight columns wide; the copy keeps them. */}
            {citation.data.trimEnd().replace(/\t/g, "  ")}
          </Text>
        </ScrollView>
      )}
      <View style={styles.actions}>
        <Button label={`Copy ${label} citation`} onPress={copy} disabled={!citation.data} />
        <View role="status" aria-live="polite">
          {copied === "done" ? <Text style={styles.ok}>Copied</Text> : null}
          {copied === "failed" ? <Text style={styles.failed}>Could not copy; select the text instead.</Text> : null}
        </View>
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  formats: { flexDirection: "row", flexWrap: "wrap", gap: space.sm },
  format: {
    minHeight: minTap,
    paddingHorizontal: space.md,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
    backgroundColor: colors.card,
    alignItems: "center",
    justifyContent: "center",
  },
  formatSelected: { backgroundColor: colors.fieldTint, borderColor: colors.field },
  formatLabel: { fontFamily: fonts.medium, fontSize: 14, color: colors.ink },
  formatLabelSelected: { color: colors.fieldDark, fontFamily: fonts.semibold },
  box: { backgroundColor: colors.paper, borderRadius: radius.md, borderWidth: 1, borderColor: colors.line, maxHeight: 260 },
  boxContent: { padding: space.md },
  actions: { flexDirection: "row", alignItems: "center", flexWrap: "wrap", gap: space.md },
  ok: { color: colors.fieldDark, fontFamily: fonts.semibold },
  failed: { color: colors.danger },
});
