import { useState } from "react";
import { StyleSheet, View } from "react-native";
import { Card } from "@/components/ui/card";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, fonts, space } from "@/constants/theme";
import { useReviewComments, useReviewSummary } from "@/hooks/use-review";
import type { ReviewComment, ReviewSummary, SiteYearResult } from "@/schemas/review";
import { formatPValue } from "@/components/evidence/format";
import { numberOr, yieldWords } from "./format";
import { Pager } from "./pager";
import { SiteYearAnovaSlot } from "./site-year-anova-slot";
import { SiteYearComments } from "./site-year-comments";

const kgHa = (x: number) => Math.round(x).toLocaleString("en-US");

function anovaLine(r: SiteYearResult): string {
  const a = r.anova;
  if (!a) return "No ANOVA: no response could be computed.";
  const f = a.f === null ? "F from published means not recomputed" : `F = ${a.f.toFixed(2)} on ${a.dfTreatment} and ${a.dfError} df`;
  const lsd = a.lsd05KgHa === null ? "LSD –" : `LSD(0.05) ${yieldWords(a.lsd05KgHa, r.crop)}`;
  return `${f}, ${formatPValue(a.pValue)} · ${lsd} · CV ${numberOr(a.cvPct, 1)} %`;
}

function SiteYearCard({ result, summary, comments }: { result: SiteYearResult; summary: ReviewSummary; comments: ReviewComment[] }) {
  const r = result;
  return (
    <View style={styles.card} role="listitem" aria-label={`Site-year ${r.siteYear}`} testID={`site-year-${r.siteYear}`}>
      <View style={styles.head}>
        <Text variant="subheading">{r.siteYear}</Text>
        <Text variant="caption">
          {r.crop} · {r.year} · site {r.site} · {r.fromSummary ? "from published means" : `${r.plots} plots`}
          {r.replicates !== null ? ` · r = ${r.replicates}` : ""}
          {r.balanced === false ? " · unbalanced" : ""}
        </Text>
      </View>
      <Text testID={`anova-line-${r.siteYear}`}>{anovaLine(r)}</Text>
      {r.responses.length ? (
        <View role="table" aria-label={`Responses at ${r.siteYear}`}>
          <View role="row" style={[styles.tr, styles.th]}>
            {["Treatment", "Check mean (kg/ha)", "Treated mean (kg/ha)", "Response (± SE)"].map((h) => (
              <Text key={h} role="columnheader" style={[styles.td, styles.thText]}>
                {h}
              </Text>
            ))}
          </View>
          {r.responses.map((x) => (
            <View key={x.treatment} role="row" style={styles.tr}>
              <Text role="cell" style={styles.td}>
                {x.treatment}
              </Text>
              <Text role="cell" style={styles.td}>
                {kgHa(x.checkMeanKgHa)}
              </Text>
              <Text role="cell" style={styles.td}>
                {kgHa(x.treatedMeanKgHa)}
              </Text>
              <Text role="cell" style={styles.td}>
                {yieldWords(x.mdKgHa, r.crop, true)} ± {Math.round(x.seKgHa)}
              </Text>
            </View>
          ))}
        </View>
      ) : null}
      {r.flags.length ? (
        <View style={styles.flags} role="list" aria-label={`Flags on ${r.siteYear}`}>
          {r.flags.map((f, i) => (
            <Text key={`${f.code}-${i}`} role="listitem" style={styles.flag}>
              Flag · {summary.rules.find((x) => x.code === f.code)?.title ?? f.code}: {f.message}
            </Text>
          ))}
        </View>
      ) : null}
      <SiteYearAnovaSlot versionId={summary.version.id} siteYear={r.siteYear} />
      <SiteYearComments versionId={summary.version.id} siteYear={r.siteYear} comments={comments} canComment={summary.canComment} />
    </View>
  );
}

/** Each site-year's responses with its own ANOVA (F, p, LSD, CV), its flags and the reviewers' comments beside it. */
export function SiteYearResults({ versionId }: { versionId: string }) {
  const [page, setPage] = useState(1);
  const [flagged, setFlagged] = useState(false);
  const summary = useReviewSummary(versionId, page, flagged);
  const comments = useReviewComments(versionId);
  if (summary.isPending) return <LoadingState label="Reading the site-years…" />;
  if (summary.isError) return <ErrorState error={summary.error} onRetry={() => summary.refetch()} />;
  const s = summary.data;
  const all = comments.data?.items ?? [];
  return (
    <Card>
      <Text variant="heading">Per-site-year results</Text>
      <Text variant="caption">
        {s.flaggedSiteYears} of the version&apos;s site-years carry a flag. A flag asks you to look; it does not block approval.
      </Text>
      <ChoiceChips
        label="Show"
        choices={[
          { value: "all", label: "All site-years" },
          { value: "flagged", label: "Flagged only" },
        ]}
        selected={[flagged ? "flagged" : "all"]}
        onToggle={(value) => {
          setFlagged(value === "flagged");
          setPage(1);
        }}
      />
      {s.siteYears.length === 0 ? (
        <EmptyState title={flagged ? "No flagged site-years" : "No site-years yet"} />
      ) : (
        <View role="list" aria-label="Site-years" style={styles.list}>
          {s.siteYears.map((r) => (
            <SiteYearCard key={r.siteYear} result={r} summary={s} comments={all.filter((c) => c.siteYear === r.siteYear)} />
          ))}
        </View>
      )}
      <Pager page={s.page} limit={s.limit} total={s.total} what="site-years" onPage={setPage} />
      <View style={styles.rules}>
        <Text variant="subheading">How the flags are raised</Text>
        {s.rules.map((rule) => (
          <Text key={rule.code} variant="caption">
            <Text variant="caption" style={styles.ruleTitle}>
              {rule.title}.
            </Text>{" "}
            {rule.rule} Source: {rule.source}
          </Text>
        ))}
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.md },
  card: { gap: space.sm, paddingVertical: space.md, borderTopWidth: 1, borderTopColor: colors.line },
  head: { gap: 2 },
  tr: { flexDirection: "row", borderBottomWidth: 1, borderBottomColor: colors.line, minHeight: 36, alignItems: "center" },
  th: { backgroundColor: colors.fieldTint },
  thText: { fontFamily: fonts.semibold, color: colors.fieldDark },
  td: { flex: 1, paddingHorizontal: space.xs, fontSize: 13, fontVariant: ["tabular-nums"] },
  flags: { gap: space.xs, padding: space.sm, borderRadius: 8, backgroundColor: colors.wheatTint },
  flag: { color: colors.wheatText },
  rules: { gap: space.xs, marginTop: space.md },
  ruleTitle: { fontFamily: fonts.semibold },
});
