import { Link } from "expo-router";
import { StyleSheet, View } from "react-native";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import type { MetaAnalysisResponse } from "@/schemas/analysis";
import { Disclosure } from "./disclosure";

/** What produced the numbers: dataset versions, the method, and the site-years used and left out (with why). */
export function ProvenancePanel({ result }: { result: MetaAnalysisResponse }) {
  const p = result.provenance;
  return (
    <Card testID="provenance">
      <Text variant="heading">Where these numbers come from</Text>
      {p.versions.map((v) => (
        <Text key={`${v.dataset}@${v.version}`}>
          <Link href={`/datasets/${v.dataset}`} style={styles.link} accessibilityLabel={`Dataset ${v.title}, version ${v.version}`}>
            {v.title}
          </Link>{" "}
          v{v.version} · {v.licence} · {v.siteYearsUsed} site-year{v.siteYearsUsed === 1 ? "" : "s"} used
        </Text>
      ))}
      <Text variant="caption">
        {p.k} site-years used from {p.contrastsRead} treatment-vs-check responses; {p.excluded.length} site-year
        {p.excluded.length === 1 ? "" : "s"} left out. Method: {p.method}
        {p.method === "FE" ? "" : " τ²"}, {p.ci === "hksj" ? "HKSJ" : "Wald"} CI, effect{" "}
        {p.effect === "md" ? "yield difference" : "log response ratio"} in {p.units}.
      </Text>
      <Text variant="caption" testID="nutrient-rule">
        Nutrient rule: {p.nutrientRule.text}
      </Text>
      {p.excluded.length ? (
        <Disclosure title={`Left out: ${p.excluded.length}`} hint="Tap to see why" testID="excluded-toggle">
          <View style={styles.list}>
            {p.excluded.map((e) => (
              <Text key={`${e.dataset}-${e.siteYearCode}-${e.reason}`} variant="caption">
                {e.siteYearCode} ({e.dataset} v{e.version}, {e.treatments.join(", ")}): {e.reason}
              </Text>
            ))}
          </View>
        </Disclosure>
      ) : null}
      <Text variant="caption">{p.combination}</Text>
    </Card>
  );
}

const styles = StyleSheet.create({
  link: { color: colors.info, textDecorationLine: "underline" },
  list: { gap: space.xs },
});
