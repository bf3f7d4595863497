import { router } from "expo-router";
import { Disclosure } from "@/components/evidence/disclosure";
import { Card } from "@/components/ui/card";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { useVersionSiteYears } from "@/hooks/use-site-year-anova";
import { SiteYearAnovaPanel } from "./site-year-anova";

/**
 * The dataset page's site-year analysis: choose a site-year of the version shown and read its own ANOVA. The choice
 * is kept in the address (`?siteYear=`), so a copied link opens the same table.
 */
export function SiteYearAnovaCard({ slug, semver, siteYear }: { slug: string; semver: string; siteYear?: string }) {
  const list = useVersionSiteYears(slug, semver);
  const codes = list.data?.items.map((s) => s.code) ?? [];
  const chosen = siteYear && codes.includes(siteYear) ? siteYear : undefined;
  return (
    <Card testID="site-year-analysis">
      <Text variant="heading">Site-year analysis (v{semver})</Text>
      <Text variant="caption">
        Each site-year is its own randomized complete block trial. Choose one for its analysis of variance, LSDs and treatment means.
      </Text>
      {list.isPending ? (
        <LoadingState label="Loading the site-years…" />
      ) : list.isError ? (
        <ErrorState error={list.error} onRetry={() => list.refetch()} />
      ) : codes.length === 0 ? (
        <Text variant="caption">This version has no site-years.</Text>
      ) : (
        <Disclosure
          title={chosen ? `Site-year ${chosen}` : "Choose a site-year"}
          hint={`${codes.length} site-year${codes.length === 1 ? "" : "s"} in this version`}
          initiallyOpen={!chosen}
          testID="site-year-chooser"
        >
          <ChoiceChips
            label="Site-year"
            testID="anova-site-year"
            choices={codes.map((c) => ({ value: c, label: c }))}
            selected={chosen ? [chosen] : []}
            onToggle={(code) => router.setParams({ siteYear: code })}
          />
        </Disclosure>
      )}
      {siteYear && list.isSuccess && !chosen ? <Text variant="caption">This version has no site-year {siteYear}.</Text> : null}
      {chosen ? <SiteYearAnovaPanel key={`${semver}/${chosen}`} source={{ slug, semver }} code={chosen} /> : null}
    </Card>
  );
}
