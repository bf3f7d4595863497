import { Link } from "expo-router";
import { Screen } from "@/components/screen";
import { Text } from "@/components/ui/text";

export default function NotFound() {
  return (
    <Screen title="Nothing here">
      <Text>This address does not match a page of Plotbank.</Text>
      <Link href="/datasets">
        <Text style={{ textDecorationLine: "underline" }}>Go to the datasets</Text>
      </Link>
    </Screen>
  );
}
