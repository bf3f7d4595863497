import { View } from "react-native";
import { Text } from "@/components/ui/text";
import { space } from "@/constants/theme";
import type { CiMethod, EffectMeasure, TauMethod } from "@/schemas/analysis";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { Disclosure } from "./disclosure";

export interface MethodOptions {
  effect: EffectMeasure;
  method: TauMethod;
  ci: CiMethod;
}

/** Effect size, τ² estimator and CI method, behind a disclosure: the defaults follow current guidance. */
export function AdvancedOptions({ value, onChange }: { value: MethodOptions; onChange: (next: MethodOptions) => void }) {
  return (
    <Disclosure title="Advanced" hint="Effect size, τ² method, CI method" testID="advanced-toggle">
      <View style={{ gap: space.md }}>
        <ChoiceChips
          label="Effect"
          testID="opt-effect"
          choices={[
            { value: "md", label: "Yield difference" },
            { value: "lnrr", label: "Log response ratio" },
          ]}
          selected={[value.effect]}
          onToggle={(effect) => onChange({ ...value, effect })}
        />
        <ChoiceChips
          label="τ² method"
          testID="opt-method"
          choices={[
            { value: "REML", label: "REML" },
            { value: "DL", label: "DerSimonian–Laird" },
            { value: "PM", label: "Paule–Mandel" },
            { value: "FE", label: "Fixed effect" },
          ]}
          selected={[value.method]}
          onToggle={(method) => onChange({ ...value, method })}
        />
        <ChoiceChips
          label="CI method"
          testID="opt-ci"
          choices={[
            { value: "hksj", label: "HKSJ (t)" },
            { value: "wald", label: "Wald (z)" },
          ]}
          selected={[value.ci]}
          onToggle={(ci) => onChange({ ...value, ci })}
        />
        <Text variant="caption">
          Defaults: REML τ², Hartung–Knapp–Sidik–Jonkman CI, prediction interval with t(k − 2) (Veroniki et al. 2016; IntHout et al. 2014).
        </Text>
      </View>
    </Disclosure>
  );
}
