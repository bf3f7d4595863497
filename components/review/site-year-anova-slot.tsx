import { SiteYearAnovaPanel } from "@/components/dataset/site-year-anova";
import { Disclosure } from "@/components/evidence/disclosure";

/**
 * The full per-site-year ANOVA (the whole table, LS-means and the LSD of every pair) of a version under review, read
 * from the curation route so a draft's editors and reviewers see it before anyone else. Fetched only when opened.
 */
export function SiteYearAnovaSlot({ versionId, siteYear }: { versionId: string; siteYear: string }) {
  return (
    <Disclosure
      title={`Full ANOVA of ${siteYear}`}
      hint="The whole ANOVA table, LS-means and the LSD of every pair"
      testID={`anova-slot-${siteYear}`}
    >
      <SiteYearAnovaPanel source={{ versionId }} code={siteYear} />
    </Disclosure>
  );
}
