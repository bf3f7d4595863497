import { useState } from "react";
import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Text } from "@/components/ui/text";
import { FieldError, TextField } from "@/components/ui/text-field";
import { colors, space } from "@/constants/theme";
import { useCommentMutation, useResolveCommentMutation } from "@/hooks/use-review";
import type { ReviewComment } from "@/schemas/review";
import { formatDay } from "@/components/curation/format";

/** The reviewers' comments beside one site-year, and (for a reviewer, while it is in review) a box to add one. */
export function SiteYearComments({
  versionId,
  siteYear,
  comments,
  canComment,
}: {
  versionId: string;
  siteYear: string;
  comments: ReviewComment[];
  canComment: boolean;
}) {
  const [text, setText] = useState("");
  const add = useCommentMutation(versionId);
  const resolve = useResolveCommentMutation(versionId);
  return (
    <View style={styles.box} role="group" aria-label={`Reviewer comments on ${siteYear}`}>
      {comments.map((c) => (
        <View key={c.id} style={[styles.comment, c.resolvedAt ? styles.resolved : null]} testID="review-comment">
          <Text variant="label">
            {c.authorName} · {formatDay(c.createdAt)}
            {c.resolvedAt ? ` · dealt with${c.resolvedByName ? ` (${c.resolvedByName})` : ""}` : ""}
          </Text>
          <Text>{c.body}</Text>
          {!c.resolvedAt ? (
            <Button
              label="Mark as dealt with"
              accessibilityLabel={`Mark the comment on ${siteYear} as dealt with`}
              tone="quiet"
              busy={resolve.isPending && resolve.variables === c.id}
              onPress={() => resolve.mutate(c.id)}
            />
          ) : null}
        </View>
      ))}
      {resolve.error ? <FieldError message={resolve.error.message} /> : null}
      {canComment ? (
        <View style={styles.form}>
          <TextField label={`Comment on ${siteYear}`} value={text} onChangeText={setText} multiline error={add.error?.message} />
          <Button
            label="Add comment"
            accessibilityLabel={`Add comment on ${siteYear}`}
            tone="secondary"
            busy={add.isPending}
            disabled={text.trim().length < 3}
            onPress={() => add.mutate({ siteYear, body: text.trim() }, { onSuccess: () => setText("") })}
          />
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.sm },
  comment: { padding: space.sm, borderRadius: 8, backgroundColor: colors.infoTint, gap: space.xs },
  resolved: { backgroundColor: colors.paper },
  form: { gap: space.sm },
});
