import { useState } from "react";
import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { datasetCreate, datasetPatch, type CurationDataset, type DatasetCreate } from "@/schemas/curation";
import { initialValues, toDatasetBody, type ContributorDraft, type DatasetFormValues } from "./dataset-form-values";
import { contributor as contributorSchema } from "@/schemas/dataset-metadata";
import { crops } from "@/schemas/filters";
import { issuesUnder, serverFieldIssues, zodFieldIssues, type FieldIssues } from "./field-issues";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { FieldError, TextField } from "@/components/ui/text-field";

const cropOptions = crops.map((value) => ({ value, label: value[0]!.toUpperCase() + value.slice(1) }));
const roleOptions = contributorSchema.shape.role.options.map((value) => ({ value, label: value.replace(/_/g, " ") }));

/**
 * The dataset's descriptive metadata. Checked on the device with the same zod contract the server uses, and the
 * server's own field errors (problem+json) land at the same inputs.
 */
export function DatasetForm({
  dataset,
  submitLabel,
  busy,
  onSubmit,
}: {
  dataset: CurationDataset | null;
  submitLabel: string;
  busy: boolean;
  onSubmit: (body: DatasetCreate) => Promise<unknown>;
}) {
  const [values, setValues] = useState<DatasetFormValues>(() => initialValues(dataset));
  const [issues, setIssues] = useState<FieldIssues>({});
  const editing = dataset !== null;
  const set = <K extends keyof DatasetFormValues>(key: K, value: DatasetFormValues[K]) => setValues((v) => ({ ...v, [key]: value }));
  const setContributor = (i: number, patch: Partial<ContributorDraft>) =>
    setValues((v) => ({ ...v, contributors: v.contributors.map((c, j) => (j === i ? { ...c, ...patch } : c)) }));

  const submit = async () => {
    const body = toDatasetBody(values);
    const { slug: _slug, ...patch } = body;
    const checked = editing ? datasetPatch.safeParse(patch) : datasetCreate.safeParse(body);
    if (!checked.success) {
      setIssues(zodFieldIssues(checked.error));
      return;
    }
    setIssues({});
    try {
      await onSubmit(body);
    } catch (error) {
      setIssues(serverFieldIssues(error));
    }
  };

  const count = Object.keys(issues).length;
  return (
    <View style={styles.form}>
      <Card>
        <Text variant="heading">About the dataset</Text>
        <TextField label="Title" value={values.title} onChangeText={(t) => set("title", t)} error={issues.title} />
        <TextField
          label="Slug (web address)"
          value={values.slug}
          onChangeText={(t) => set("slug", t)}
          error={issues.slug}
          editable={!editing}
          autoCapitalize="none"
          hint={
            editing
              ? "The address stays fixed once the dataset exists."
              : "Lower-case words joined by hyphens, e.g. soybean-starter-placement."
          }
        />
        <ChoiceChips
          label="Crops"
          multiple
          choices={cropOptions}
          selected={values.crops}
          error={issues.crops}
          onToggle={(c) => set("crops", values.crops.includes(c) ? values.crops.filter((x) => x !== c) : [...values.crops, c])}
        />
        <TextField
          label="Region"
          value={values.region}
          onChangeText={(t) => set("region", t)}
          error={issues.region}
          hint="Coarse only: a basin, county or region, never a farm."
        />
        <TextField
          label="Description"
          multiline
          value={values.description}
          onChangeText={(t) => set("description", t)}
          error={issues.description}
        />
        <TextField
          label="Licence"
          value={values.licence}
          onChangeText={(t) => set("licence", t)}
          error={issues.licence}
          autoCapitalize="none"
          hint="SPDX identifier; CC-BY-4.0 unless the data owners chose otherwise."
        />
        <TextField
          label="Keywords"
          value={values.keywords}
          onChangeText={(t) => set("keywords", t)}
          error={issues.keywords ?? firstUnder(issues, "keywords.")}
          hint="Separated by commas."
        />
      </Card>

      <Card>
        <Text variant="heading">Contributors</Text>
        {values.contributors.length === 0 ? (
          <Text variant="caption">No contributors yet. Add the people who ran, collected and curated the trials.</Text>
        ) : null}
        {values.contributors.map((c, i) => {
          const ci = issuesUnder(issues, `contributors.${i}.`);
          return (
            <View key={i} style={styles.contributor} accessibilityLabel={`Contributor ${i + 1}`}>
              <TextField
                label={`Contributor ${i + 1} name`}
                value={c.name}
                onChangeText={(t) => setContributor(i, { name: t })}
                error={ci.name}
              />
              <ChoiceChips
                label={`Contributor ${i + 1} role`}
                choices={roleOptions}
                selected={[c.role]}
                onToggle={(r) => setContributor(i, { role: r })}
                error={ci.role}
              />
              <TextField
                label={`Contributor ${i + 1} ORCID iD (optional)`}
                value={c.orcid}
                placeholder="0000-0000-0000-0000"
                autoCapitalize="characters"
                onChangeText={(t) => setContributor(i, { orcid: t })}
                error={ci.orcid}
              />
              <TextField
                label={`Contributor ${i + 1} affiliation (optional)`}
                value={c.affiliation}
                onChangeText={(t) => setContributor(i, { affiliation: t })}
                error={ci.affiliation}
              />
              <Button
                label={`Remove contributor ${i + 1}`}
                tone="quiet"
                style={styles.left}
                onPress={() => setValues((v) => ({ ...v, contributors: v.contributors.filter((_, j) => j !== i) }))}
              />
            </View>
          );
        })}
        <Button
          label="Add contributor"
          tone="secondary"
          style={styles.left}
          onPress={() =>
            setValues((v) => ({ ...v, contributors: [...v.contributors, { name: "", role: "creator", orcid: "", affiliation: "" }] }))
          }
        />
      </Card>

      <Card>
        <Text variant="heading">Funding and methods</Text>
        <TextField label="Funding" multiline value={values.funding} onChangeText={(t) => set("funding", t)} error={issues.funding} />
        <TextField
          label="Methods and protocol"
          multiline
          value={values.methods}
          onChangeText={(t) => set("methods", t)}
          error={issues.methods}
          hint="Design, plot size, harvest method, moisture basis, how soil samples were taken."
        />
      </Card>

      {issues[""] ? <FieldError message={issues[""]} /> : null}
      {count > 0 && !issues[""] ? <FieldError message={`Please correct ${count} field${count === 1 ? "" : "s"} above.`} /> : null}
      <Button label={submitLabel} busy={busy} onPress={submit} style={styles.left} />
    </View>
  );
}

function firstUnder(issues: FieldIssues, prefix: string): string | undefined {
  return Object.entries(issues).find(([k]) => k.startsWith(prefix))?.[1];
}

const styles = StyleSheet.create({
  form: { gap: space.lg },
  contributor: { gap: space.sm, padding: space.md, borderRadius: 10, borderWidth: 1, borderColor: colors.line },
  left: { alignSelf: "flex-start" },
});
