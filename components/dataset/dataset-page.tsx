import { router } from "expo-router";
import { StyleSheet, View } from "react-native";
import { CitationPanel } from "@/components/citation-panel";
import { ChoiceChips } from "@/components/ui/choice-chips";
import { Screen } from "@/components/screen";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { ServerLink } from "@/components/ui/server-link";
import { ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { useDatasetDetail, useVersionSchema, versionDownloads } from "@/hooks/use-dataset-page";
import { defaultEvidenceState, routerParams } from "@/lib/share-link";
import type { VersionSummary } from "@/schemas/public";
import { DataDictionary } from "./data-dictionary";
import { FollowButton } from "./follow-button";
import { SiteYearAnovaCard } from "./site-year-anova-card";

function VersionEntry({ v }: { v: VersionSummary }) {
  const withdrawn = v.state === "withdrawn";
  return (
    <View style={[styles.version, withdrawn && styles.withdrawn]} testID={`version-${v.semver}`}>
      <Text variant="subheading">
        v{v.semver} {withdrawn ? "· withdrawn" : ""}
      </Text>
      <Text variant="caption">
        {withdrawn
          ? `Withdrawn ${v.withdrawnAt?.slice(0, 10) ?? ""}: ${v.withdrawnReason ?? "no reason given"}`
          : `Published ${v.publishedAt?.slice(0, 10) ?? ""}`}
        {v.doi ? ` · DOI ${v.doi}` : ""} · {v.licence}
      </Text>
      {v.changelog ? <Text>{v.changelog}</Text> : null}
      {v.checksum && !withdrawn ? (
        <Text variant="caption" selectable>
          SHA-256 {v.checksum.slice(0, 16)}…
        </Text>
      ) : null}
    </View>
  );
}

/** What stays of a withdrawn version: when and why, its DOI, and where the data went. */
function Tombstone({ v, newest }: { v: VersionSummary; newest: VersionSummary | undefined }) {
  return (
    <Card testID="tombstone" accessibilityLabel={`Version ${v.semver} was withdrawn`}>
      <Text variant="heading">v{v.semver} was withdrawn</Text>
      <Text>
        Withdrawn {v.withdrawnAt?.slice(0, 10) ?? ""}: {v.withdrawnReason ?? "no reason given"}
      </Text>
      <Text variant="caption">
        Its data are no longer served; this page keeps its record{v.doi ? `, and its DOI ${v.doi} still resolves here` : ""}.
        {newest ? ` The newest published version is v${newest.semver}.` : ""}
      </Text>
      {newest ? (
        <Button
          label={`Open v${newest.semver}`}
          tone="secondary"
          onPress={() => router.setParams({ version: newest.semver })}
          style={styles.left}
        />
      ) : null}
    </Card>
  );
}

/**
 * A dataset's public page: what it is, its data dictionary, versions, downloads, licence and citation. `version`
 * (from ?version=, where each version's DOI lands) picks the version shown; choosing another rewrites the URL, so a
 * copied link opens the same version; `siteYear` (from ?siteYear=) opens that site-year's analysis.
 */
export function DatasetPage({ slug, version, siteYear }: { slug: string; version?: string; siteYear?: string }) {
  const detail = useDatasetDetail(slug);
  const published = detail.data?.versions.filter((v) => v.state === "published") ?? [];
  const asked = version ? detail.data?.versions.find((v) => v.semver === version) : undefined;
  const semver = asked?.semver ?? published[0]?.semver ?? null;
  const schema = useVersionSchema(slug, semver);

  if (detail.isPending)
    return (
      <Screen title="Dataset">
        <LoadingState label="Loading the dataset…" />
      </Screen>
    );
  if (detail.isError)
    return (
      <Screen title="Dataset">
        <ErrorState error={detail.error} onRetry={() => detail.refetch()} />
      </Screen>
    );
  const d = detail.data;
  const current = d.versions.find((v) => v.semver === semver) ?? null;
  const resources = schema.data ? Object.keys(schema.data.resources) : [];
  const downloads = semver ? versionDownloads(slug, semver, resources) : null;
  const years = d.yearFrom && d.yearTo ? `${d.yearFrom}–${d.yearTo}` : "no seasons yet";
  return (
    <Screen
      title={d.title}
      subtitle={`${d.crops.join(", ")} · ${d.region} · ${d.siteYears} site-years · ${years}`}
      documentTitle={current ? `${d.title} (version ${current.semver}${current.state === "withdrawn" ? ", withdrawn" : ""})` : d.title}
      description={d.description}
    >
      <Card testID="dataset-metadata">
        <Text>{d.description}</Text>
        {d.methods ? <Text variant="caption">Methods: {d.methods}</Text> : null}
        {d.funding ? <Text variant="caption">Funding: {d.funding}</Text> : null}
        {d.contributors.length ? (
          <Text variant="caption">Contributors: {d.contributors.map((c) => `${c.name} (${c.role.replace("_", " ")})`).join(", ")}</Text>
        ) : null}
        {d.keywords.length ? <Text variant="caption">Keywords: {d.keywords.join(", ")}</Text> : null}
        <Text variant="label" testID="dataset-licence">
          Licence: {d.licence}
        </Text>
        <Button
          label="Analyse this dataset"
          testID="analyse-dataset"
          onPress={() => router.push({ pathname: "/", params: routerParams({ ...defaultEvidenceState, filters: { dataset: slug } }) })}
        />
        {published.length > 0 ? <FollowButton slug={slug} title={d.title} /> : null}
      </Card>
      {version && !asked ? (
        <Card testID="version-not-found">
          <Text>
            This dataset has no version {version}
            {published[0] ? `; showing the newest, v${published[0].semver}` : ""}.
          </Text>
        </Card>
      ) : null}
      {published.length > 1 ? (
        <ChoiceChips
          label="Version"
          testID="version-picker"
          choices={published.map((v) => ({ value: v.semver, label: `v${v.semver}` }))}
          selected={semver ? [semver] : []}
          onToggle={(v) => router.setParams({ version: v })}
        />
      ) : null}
      {current?.state === "withdrawn" ? <Tombstone v={current} newest={published[0]} /> : null}
      {current && current.state === "published" && downloads ? (
        <Card testID="downloads">
          <Text variant="heading">Download v{current.semver}</Text>
          <ServerLink href={downloads.dataPackage} label="Data Package (datapackage.json + CSV, zip)" testID="download-datapackage" />
          {downloads.resources.map((r) => (
            <ServerLink key={r.resource} href={r.url} label={`${r.resource}.csv`} testID={`download-${r.resource}`} />
          ))}
          <Text variant="caption">Licence {current.licence}: reuse with attribution to the citation below.</Text>
        </Card>
      ) : null}
      {current && current.state === "published" ? <SiteYearAnovaCard slug={slug} semver={current.semver} siteYear={siteYear} /> : null}
      {current && current.state === "published" ? (
        <Card testID="citation">
          <CitationPanel slug={slug} semver={current.semver} />
        </Card>
      ) : null}
      <Card>
        <Text variant="heading">Data dictionary{semver ? ` (v${semver})` : ""}</Text>
        {schema.isPending && semver ? (
          <LoadingState label="Loading the data dictionary…" />
        ) : schema.isError ? (
          <ErrorState error={schema.error} onRetry={() => schema.refetch()} />
        ) : schema.data ? (
          <DataDictionary schema={schema.data} />
        ) : (
          <Text variant="caption">No published version yet.</Text>
        )}
      </Card>
      <Card testID="versions">
        <Text variant="heading">Versions</Text>
        {d.versions.length ? (
          d.versions.map((v) => <VersionEntry key={v.semver} v={v} />)
        ) : (
          <Text variant="caption">No published versions.</Text>
        )}
      </Card>
    </Screen>
  );
}

const styles = StyleSheet.create({
  version: { gap: 2, paddingVertical: space.sm, borderTopWidth: 1, borderTopColor: colors.line },
  withdrawn: { backgroundColor: colors.dangerTint, paddingHorizontal: space.sm, borderRadius: 8 },
  left: { alignSelf: "flex-start" },
});
