import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Text } from "@/components/ui/text";
import { space } from "@/constants/theme";
import { toggleListValue } from "@/lib/share-link";
import { cropLabels, nutrientLabels, placementLabels, soilTestClassLabels, tillageLabels } from "@/constants/vocabulary";
import { crops, nutrients, placements, soilTestClasses, tillages, type TrialFilters } from "@/schemas/filters";
import { ChoiceChips } from "@/components/ui/choice-chips";

type Filters = Partial<TrialFilters>;

/** Row spacing bands, inches: narrow drilled/15-in rows and wide 30-in rows. */
const spacingBands = {
  any: { label: "Any", min: undefined, max: undefined },
  narrow: { label: "15 in or less", min: undefined, max: 15 },
  wide: { label: "30 in or more", min: 30, max: undefined },
} as const;
type SpacingBand = keyof typeof spacingBands;

function spacingBandOf(f: Filters): SpacingBand {
  if (f.rowSpacingMax === 15 && f.rowSpacingMin === undefined) return "narrow";
  if (f.rowSpacingMin === 30 && f.rowSpacingMax === undefined) return "wide";
  return "any";
}

const choicesOf = <T extends string>(values: readonly T[], labels: Record<string, string>) =>
  values.map((value) => ({ value, label: labels[value] ?? value }));

/** The shared trial filters as chips; every change goes straight to the URL through onChange. */
export function FilterPanel({ filters, onChange, years }: { filters: Filters; onChange: (next: Filters) => void; years: number[] }) {
  const set = (patch: Filters) => onChange({ ...filters, ...patch });
  const yearChoices = [{ value: "any", label: "Any" }, ...years.map((y) => ({ value: String(y), label: String(y) }))];
  return (
    <View style={styles.panel} testID="filter-panel">
      {filters.dataset ? (
        <View style={styles.dataset}>
          <Text variant="label">
            Dataset: {filters.dataset}
            {filters.version ? ` ${filters.version}` : ""}
          </Text>
          <Button
            label="All datasets"
            tone="secondary"
            onPress={() => set({ dataset: undefined, version: undefined })}
            accessibilityLabel="Clear the dataset filter"
          />
        </View>
      ) : null}
      <ChoiceChips
        label="Crop"
        multiple
        testID="filter-crop"
        choices={choicesOf(crops, cropLabels)}
        selected={filters.crop ?? []}
        onToggle={(v) => set({ crop: toggleListValue(filters.crop, v) })}
      />
      <ChoiceChips
        label="Nutrient"
        multiple
        testID="filter-nutrient"
        choices={choicesOf(nutrients, nutrientLabels)}
        selected={filters.nutrient ?? []}
        onToggle={(v) => set({ nutrient: toggleListValue(filters.nutrient, v) })}
      />
      <ChoiceChips
        label="Placement"
        multiple
        testID="filter-placement"
        choices={choicesOf(placements, placementLabels)}
        selected={filters.placement ?? []}
        onToggle={(v) => set({ placement: toggleListValue(filters.placement, v) })}
      />
      <ChoiceChips
        label="Soil-test class"
        multiple
        testID="filter-soil"
        choices={choicesOf(soilTestClasses, soilTestClassLabels)}
        selected={filters.soilTestClass ?? []}
        onToggle={(v) => set({ soilTestClass: toggleListValue(filters.soilTestClass, v) })}
      />
      {years.length ? (
        <>
          <ChoiceChips
            label="From year"
            testID="filter-year-from"
            choices={yearChoices}
            selected={[filters.yearFrom ? String(filters.yearFrom) : "any"]}
            onToggle={(v) =>
              set({
                yearFrom: v === "any" ? undefined : Number(v),
                yearTo: filters.yearTo && v !== "any" && Number(v) > filters.yearTo ? undefined : filters.yearTo,
              })
            }
          />
          <ChoiceChips
            label="To year"
            testID="filter-year-to"
            choices={yearChoices}
            selected={[filters.yearTo ? String(filters.yearTo) : "any"]}
            onToggle={(v) =>
              set({
                yearTo: v === "any" ? undefined : Number(v),
                yearFrom: filters.yearFrom && v !== "any" && Number(v) < filters.yearFrom ? undefined : filters.yearFrom,
              })
            }
          />
        </>
      ) : null}
      <ChoiceChips
        label="Tillage"
        multiple
        testID="filter-tillage"
        choices={choicesOf(tillages, tillageLabels)}
        selected={filters.tillage ?? []}
        onToggle={(v) => set({ tillage: toggleListValue(filters.tillage, v) })}
      />
      <ChoiceChips
        label="Row spacing"
        testID="filter-spacing"
        choices={(Object.keys(spacingBands) as SpacingBand[]).map((value) => ({ value, label: spacingBands[value].label }))}
        selected={[spacingBandOf(filters)]}
        onToggle={(v) => set({ rowSpacingMin: spacingBands[v].min, rowSpacingMax: spacingBands[v].max })}
      />
      <Button
        label="Clear filters"
        tone="quiet"
        onPress={() => onChange({})}
        accessibilityLabel="Clear all filters"
        testID="clear-filters"
      />
    </View>
  );
}

const styles = StyleSheet.create({
  panel: { gap: space.lg },
  dataset: { gap: space.sm },
});
