import { Disclosure } from "@/components/evidence/disclosure";
import { Text } from "@/components/ui/text";

/**
 * Where the full per-site-year ANOVA panel (the SiteYearAnova panel: the whole table, treatment means and their
 * separation) is embedded when it is available. Until then it says what the summary line above already holds.
 */
export function SiteYearAnovaSlot({ siteYear }: { versionId: string; siteYear: string }) {
  return (
    <Disclosure title={`Full ANOVA of ${siteYear}`} hint="The whole ANOVA table and the treatment means" testID={`anova-slot-${siteYear}`}>
      <Text variant="caption">
        The full table is not available here yet; the line above gives this site-year&apos;s treatment F, p, LSD and CV from its own ANOVA.
      </Text>
    </Disclosure>
  );
}
