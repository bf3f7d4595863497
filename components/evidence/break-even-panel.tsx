import { useEffect, useRef, useState } from "react";
import { StyleSheet, TextInput, View } from "react-native";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, radius, space } from "@/constants/theme";
import type { PriceKey, Prices } from "@/lib/share-link";
import type { MetaAnalysisResponse } from "@/schemas/analysis";
import { pricedDecision } from "@/stats/decision";
import { ChanceBars } from "./chance-bars";
import { formatMoney, formatPercent, formatResponse, parseMoneyInput, unitLabel } from "./format";

const fields: { key: PriceKey; label: string; unit: string; testID: string }[] = [
  { key: "productCost", label: "Product cost", unit: "$/ac", testID: "product-cost-input" },
  { key: "applicationCost", label: "Application cost", unit: "$/ac", testID: "application-cost-input" },
  { key: "price", label: "Grain price", unit: "$/bu", testID: "price-input" },
];

function MoneyField({
  label,
  unit,
  value,
  onValue,
  testID,
}: {
  label: string;
  unit: string;
  value: number | undefined;
  onValue: (v: number | undefined) => void;
  testID: string;
}) {
  const [text, setText] = useState(value === undefined ? "" : String(value));
  const parsed = parseMoneyInput(text);
  const invalid = Number.isNaN(parsed) || (label === "Grain price" && parsed === 0);
  useEffect(() => {
    // A new link or stored value replaces what is typed, unless it is the same number.
    setText((current) => (parseMoneyInput(current) === value ? current : value === undefined ? "" : String(value)));
  }, [value]);
  const report = useRef(onValue);
  report.current = onValue;
  useEffect(() => {
    if (invalid || parsed === value) return;
    // Typing settles before the numbers and the stored copy follow it (nothing is sent).
    const timer = setTimeout(() => report.current(parsed), 250);
    return () => clearTimeout(timer);
  }, [parsed, invalid, value]);
  return (
    <View style={styles.field}>
      <Text variant="label" nativeID={`${testID}-label`}>
        {label} ({unit})
      </Text>
      <TextInput
        value={text}
        onChangeText={setText}
        inputMode="decimal"
        placeholder="0.00"
        placeholderTextColor={colors.muted}
        accessibilityLabel={`${label}, ${unit}`}
        aria-invalid={invalid}
        testID={testID}
        style={[styles.input, invalid && styles.inputInvalid]}
      />
      {invalid ? (
        <Text variant="caption" style={{ color: colors.danger }}>
          Enter an amount such as 4.80{label === "Grain price" ? " (more than 0)" : ""}.
        </Text>
      ) : null}
    </View>
  );
}

/** Why the two numbers differ, in one sentence (shown beside them). */
const chanceExplanation =
  "The chance is read from the random-effects predictive distribution of a new site-year (the pooled mean, how sure we are of it, " +
  "and the true spread between site-years, t with k − 2 df); the observed share just counts these trials' site-years, whose " +
  "responses also carry each trial's own plot noise, so the two differ most with few site-years, noisy trials or a break-even near the mean.";

/** The predictive chance and the observed share of one event, as bars on one 0–100 % scale. */
function PredictedAndObserved({
  predicted,
  observed,
  what,
}: {
  predicted: number | null;
  observed: number | null;
  what: [string, string];
}) {
  return (
    <ChanceBars
      testID="chance-bars"
      bars={[
        { label: `Chance a new site-year ${what[0]}`, value: predicted, kind: "predictive" },
        { label: `Share of these site-years that ${what[1]} (observed)`, value: observed, kind: "observed" },
      ]}
    />
  );
}

/**
 * "Does it pay?": costs and price → break-even response and the chance a new site-year clears it. Everything here is
 * computed on the device from the answer's predictive distribution and observed responses; no price is sent.
 */
export function BreakEvenPanel({
  result,
  prices,
  onPrices,
}: {
  result: MetaAnalysisResponse;
  prices: Prices;
  /** Merges the fields given into the prices (the others stay). */
  onPrices: (change: Prices) => void;
}) {
  const d = result.decision;
  const u = result.units;
  const local = pricedDecision(prices, {
    unitsPerBushel: d.breakEvenUnitsPerBushel,
    predictive: d.predictive,
    observedResponses: d.observedResponses,
  });
  const missing = local.pricePerBushel === null || local.costPerAcre === null;
  return (
    <Card testID="break-even-panel">
      <Text variant="heading">Does it pay?</Text>
      <Text variant="caption" testID="prices-stay">
        Your prices stay on this device: the break-even and the chances are worked out here, and nothing you type is sent. The chance is for
        a new site-year like these trials, not a promise for one field.
      </Text>
      <View style={styles.fields}>
        {fields.map((f) => (
          <MoneyField
            key={f.key}
            label={f.label}
            unit={f.unit}
            testID={f.testID}
            value={prices[f.key]}
            onValue={(v) => onPrices({ [f.key]: v })}
          />
        ))}
      </View>
      {local.breakEven !== null ? (
        <View style={styles.results}>
          <Text testID="break-even">
            Break-even: {formatResponse(local.breakEven, u).replace("+", "")} {unitLabel(u)} ({formatMoney(local.costPerAcre ?? 0)}/ac ÷{" "}
            {formatMoney(local.pricePerBushel ?? 0)}/bu)
          </Text>
          <Text
            variant="number"
            testID="probability-profit"
            accessibilityLabel={`Chance of a profitable response ${formatPercent(local.probabilityAboveBreakEven)}`}
          >
            {formatPercent(local.probabilityAboveBreakEven)}
          </Text>
          <Text>chance that a new site-year's response beats the break-even</Text>
          <Text variant="caption" testID="share-above-break-even">
            In these trials, {formatPercent(local.shareAboveBreakEven)} of site-years beat it; {formatPercent(d.shareAboveZero)} gained any
            yield. Chance of any gain on a new site-year: {formatPercent(d.probabilityAboveZero)}.
          </Text>
          <PredictedAndObserved
            predicted={local.probabilityAboveBreakEven}
            observed={local.shareAboveBreakEven}
            what={["beats the break-even", "beat it"]}
          />
        </View>
      ) : (
        <View style={styles.results}>
          <Text variant="caption" testID="probability-above-zero">
            Chance of any gain on a new site-year: {formatPercent(d.probabilityAboveZero)}; in these trials{" "}
            {formatPercent(d.shareAboveZero)} of site-years gained.
          </Text>
          <PredictedAndObserved predicted={d.probabilityAboveZero} observed={d.shareAboveZero} what={["gains any yield", "gained"]} />
          {missing && d.breakEvenUnitsPerBushel !== null ? (
            <Text variant="caption">Give a grain price and a cost for the break-even and the chance it pays.</Text>
          ) : null}
        </View>
      )}
      {d.observedResponses === null && local.breakEven !== null ? (
        <Text variant="caption">
          • Too many site-years to send each response to this device, so the observed share at your break-even is not shown; the API gives
          it with price= and cost=.
        </Text>
      ) : null}
      <Text variant="caption" testID="chance-explained">
        {chanceExplanation}
      </Text>
      {d.breakEvenUnitsPerBushel === null ? (
        <Text variant="caption">• No break-even here: it needs a yield response in bu/ac, or in kg/ha for one crop.</Text>
      ) : null}
      {d.notes
        .filter((n) => !/^Give a grain price/.test(n))
        .map((n) => (
          <Text key={n} variant="caption">
            • {n}
          </Text>
        ))}
    </Card>
  );
}
const styles = StyleSheet.create({
  fields: { flexDirection: "row", flexWrap: "wrap", gap: space.md },
  field: { flexGrow: 1, flexBasis: 140, gap: space.xs },
  input: {
    minHeight: minTap,
    borderWidth: 1,
    borderColor: colors.muted,
    borderRadius: radius.md,
    paddingHorizontal: space.md,
    fontFamily: fonts.regular,
    fontSize: 16,
    color: colors.ink,
    backgroundColor: colors.card,
  },
  inputInvalid: { borderColor: colors.danger, borderWidth: 2 },
  results: { gap: space.xs },
});
