import { useLocalSearchParams } from "expo-router";
import { DatasetPage } from "@/components/dataset/dataset-page";

export default function DatasetRoute() {
  // `version` is where each version's DOI lands: /datasets/{slug}?version=1.1.0.
  const { slug, version, siteYear } = useLocalSearchParams<{ slug: string; version?: string; siteYear?: string }>();
  const text = (v: string | undefined) => (typeof v === "string" && v ? v : undefined);
  return <DatasetPage slug={String(slug)} version={text(version)} siteYear={text(siteYear)} />;
}
