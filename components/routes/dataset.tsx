import { useLocalSearchParams } from "expo-router";
import { DatasetPage } from "@/components/dataset/dataset-page";

export default function DatasetRoute() {
  // `version` is where each version's DOI lands: /datasets/{slug}?version=1.1.0.
  const { slug, version } = useLocalSearchParams<{ slug: string; version?: string }>();
  return <DatasetPage slug={String(slug)} version={typeof version === "string" && version ? version : undefined} />;
}
