import { ChoiceChips } from "@/components/ui/choice-chips";
import { builtInMeasureDefinitions, builtInMeasures } from "@/constants/measures";

const choices = builtInMeasures.map((m) => ({ value: m, label: builtInMeasureDefinitions[m].title }));

/** "What to compare": which measure the screen pools. Yield is the default; the choice goes into the share link. */
export function MeasureChoice({ measure, onMeasure }: { measure: string; onMeasure: (m: string) => void }) {
  return <ChoiceChips label="What to compare" testID="measure-choice" choices={choices} selected={[measure]} onToggle={onMeasure} />;
}
