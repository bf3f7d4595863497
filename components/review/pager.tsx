import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Text } from "@/components/ui/text";
import { space } from "@/constants/theme";

/** Previous / next over a server-paged list, naming what it pages ("site-years", "rows"). */
export function Pager({
  page,
  limit,
  total,
  what,
  onPage,
}: {
  page: number;
  limit: number;
  total: number;
  what: string;
  onPage: (page: number) => void;
}) {
  const pages = Math.max(1, Math.ceil(total / limit));
  if (total <= limit) return null;
  const first = (page - 1) * limit + 1;
  return (
    <View style={styles.pager}>
      <Button
        label="Previous page"
        accessibilityLabel={`Previous page of ${what}`}
        tone="quiet"
        disabled={page <= 1}
        onPress={() => onPage(page - 1)}
      />
      <Text variant="label">
        {first}–{Math.min(total, page * limit)} of {total} {what} (page {page} of {pages})
      </Text>
      <Button
        label="Next page"
        accessibilityLabel={`Next page of ${what}`}
        tone="quiet"
        disabled={page >= pages}
        onPress={() => onPage(page + 1)}
      />
    </View>
  );
}

const styles = StyleSheet.create({
  pager: { flexDirection: "row", flexWrap: "wrap", alignItems: "center", gap: space.md },
});
