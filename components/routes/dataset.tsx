import { useLocalSearchParams } from "expo-router";
import { DatasetPage } from "@/components/dataset/dataset-page";

export default function DatasetRoute() {
  const { slug } = useLocalSearchParams<{ slug: string }>();
  return <DatasetPage slug={String(slug)} />;
}
