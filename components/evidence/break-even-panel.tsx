import { useEffect, useRef, useState } from "react";
import { StyleSheet, TextInput, View } from "react-native";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, radius, space } from "@/constants/theme";
import type { PriceKey, Prices } from "@/lib/share-link";
import type { MetaAnalysisResponse } from "@/schemas/analysis";
import { formatMoney, formatPercent, formatResponse, parseMoneyInput, unitLabel } from "./format";

const fields: { key: PriceKey; label: string; unit: string; testID: string }[] = [
  { key: "productCost", label: "Product cost", unit: "$/ac", testID: "product-cost-input" },
  { key: "applicationCost", label: "Application cost", unit: "$/ac", testID: "application-cost-input" },
  { key: "price", label: "Grain price", unit: "$/bu", testID: "price-input" },
];

function MoneyField({ label, unit, value, onValue, testID }: { label: string; unit: string; value: number | undefined; onValue: (v: number | undefined) => void; testID: string }) {
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
    // Typing settles before the analysis is asked again.
    const timer = setTimeout(() => report.current(parsed), 450);
    return () => clearTimeout(timer);
  }, [parsed, invalid, value]);
  return (
    <View style={styles.field}>
      <Text variant="label" nativeID={`${testID}-label`}>{label} ({unit})</Text>
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
      {invalid ? <Text variant="caption" style={{ color: colors.danger }}>Enter an amount such as 4.80{label === "Grain price" ? " (more than 0)" : ""}.</Text> : null}
    </View>
  );
}

/** "Does it pay?": costs and price → break-even response and the chance a new site-year clears it. */
export function BreakEvenPanel({ result, prices, onPrices }: { result: MetaAnalysisResponse; prices: Prices; onPrices: (p: Prices) => void }) {
  const d = result.decision;
  const u = result.units;
  return (
    <Card testID="break-even-panel">
      <Text variant="heading">Does it pay?</Text>
      <Text variant="caption">Your prices stay on this device. The chance is for a new site-year like these trials, not a promise for one field.</Text>
      <View style={styles.fields}>
        {fields.map((f) => (
          <MoneyField key={f.key} label={f.label} unit={f.unit} testID={f.testID} value={prices[f.key]} onValue={(v) => onPrices({ ...prices, [f.key]: v })} />
        ))}
      </View>
      {d.breakEven !== null ? (
        <View style={styles.results}>
          <Text testID="break-even">
            Break-even: {formatResponse(d.breakEven, u).replace("+", "")} {unitLabel(u)} ({formatMoney(d.costPerAcre ?? 0)}/ac ÷ {formatMoney(d.pricePerBushel ?? 0)}/bu)
          </Text>
          <Text variant="number" testID="probability-profit" accessibilityLabel={`Chance of a profitable response ${formatPercent(d.probabilityAboveBreakEven)}`}>
            {formatPercent(d.probabilityAboveBreakEven)}
          </Text>
          <Text>chance that a new site-year's response beats the break-even</Text>
          <Text variant="caption" testID="share-above-break-even">
            In these trials, {formatPercent(d.shareAboveBreakEven)} of site-years beat it; {formatPercent(d.shareAboveZero)} gained any yield. Chance of any gain on a new site-year: {formatPercent(d.probabilityAboveZero)}.
          </Text>
        </View>
      ) : (
        <Text variant="caption" testID="probability-above-zero">
          Chance of any gain on a new site-year: {formatPercent(d.probabilityAboveZero)}.
        </Text>
      )}
      {d.notes.map((n) => (
        <Text key={n} variant="caption">• {n}</Text>
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
