import { useState } from "react";
import { StyleSheet, View } from "react-native";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { colors, space } from "@/constants/theme";
import { useUpdateVersionMutation, useVersionActionMutation } from "@/hooks/use-curation-versions";
import { approveBody, returnBody, semver as semverSchema, submitBody, withdrawBody, type VersionDetail } from "@/schemas/curation";
import { versionActions, type WorkbenchAction } from "./action-policy";
import { serverFieldIssues, zodFieldIssues, type FieldIssues } from "./field-issues";
import { FieldError, TextField } from "@/components/ui/text-field";

const titles: Record<WorkbenchAction, string> = {
  submit: "Submit for review",
  approve: "Approve and publish",
  return: "Return to the curator",
  withdraw: "Withdraw this version",
};

/**
 * The review-flow steps this user may take on this version, each opening its short form. Only permitted steps are
 * offered; the server decides again and its refusal is shown in place.
 */
export function VersionActions({ version }: { version: VersionDetail }) {
  const allowed = versionActions(version);
  const [open, setOpen] = useState<WorkbenchAction | null>(null);
  const [text, setText] = useState("");
  const [semver, setSemver] = useState(version.semver);
  const [issues, setIssues] = useState<FieldIssues>({});
  const [done, setDone] = useState<string | null>(null);
  const act = useVersionActionMutation(version.id);
  const patch = useUpdateVersionMutation(version.id);

  if (allowed.size === 0) return null;

  const choose = (a: WorkbenchAction) => {
    setOpen(open === a ? null : a);
    setIssues({});
    setDone(null);
    setText(a === "submit" ? version.changelog : "");
    setSemver(
      version.suggestedSemver && version.semver !== version.suggestedSemver && version.state === "draft"
        ? version.suggestedSemver
        : version.semver,
    );
  };

  const run = async () => {
    if (!open) return;
    try {
      if (open === "submit") {
        const body = submitBody.safeParse({ changelog: text });
        const sv = semverSchema.safeParse(semver.trim());
        const found = {
          ...(body.success ? {} : zodFieldIssues(body.error)),
          ...(sv.success ? {} : { semver: sv.error.issues[0]?.message ?? "not a version" }),
        };
        if (Object.keys(found).length) return setIssues(found);
        if (sv.data !== version.semver) await patch.mutateAsync({ semver: sv.data });
        await act.mutateAsync({ action: "submit", changelog: body.data!.changelog });
      } else if (open === "approve") {
        const body = approveBody.safeParse(text.trim() ? { comment: text.trim() } : {});
        if (!body.success) return setIssues(zodFieldIssues(body.error));
        await act.mutateAsync({ action: "approve", ...body.data });
      } else if (open === "return") {
        const body = returnBody.safeParse({ comment: text });
        if (!body.success) return setIssues(zodFieldIssues(body.error));
        await act.mutateAsync({ action: "return", comment: body.data.comment });
      } else {
        const body = withdrawBody.safeParse({ reason: text });
        if (!body.success) return setIssues(zodFieldIssues(body.error));
        await act.mutateAsync({ action: "withdraw", reason: body.data.reason });
      }
      setDone(`${titles[open]}: done.`);
      setOpen(null);
    } catch (error) {
      setIssues(serverFieldIssues(error));
    }
  };

  const textLabel =
    open === "submit"
      ? "Changelog"
      : open === "withdraw"
        ? "Reason for withdrawal"
        : open === "return"
          ? "Comment for the curator"
          : "Comment (optional)";
  const textIssue = issues.changelog ?? issues.comment ?? issues.reason;
  return (
    <Card accessibilityLabel="Review steps">
      <Text variant="heading">Next step</Text>
      <View style={styles.buttons}>
        {[...allowed].map((a) => (
          <Button
            key={a}
            label={titles[a]}
            tone={a === "withdraw" ? "danger" : open === a ? "primary" : "secondary"}
            aria-expanded={open === a}
            onPress={() => choose(a)}
          />
        ))}
      </View>
      {open ? (
        <View style={styles.form}>
          {open === "submit" ? (
            <TextField
              label="Version number"
              value={semver}
              onChangeText={setSemver}
              error={issues.semver}
              autoCapitalize="none"
              hint={
                version.suggestedBump
                  ? `Suggested from the changes: ${version.suggestedBump} → ${version.suggestedSemver}`
                  : "MAJOR.MINOR.PATCH"
              }
            />
          ) : null}
          {open === "approve" ? (
            <Text variant="caption">Approving publishes v{version.semver}: its rows become immutable and public under its licence.</Text>
          ) : null}
          <TextField
            label={textLabel}
            multiline
            value={text}
            onChangeText={setText}
            error={textIssue}
            hint={open === "submit" ? "What changed since the last version: site-years added, corrections, dictionary changes." : undefined}
          />
          {issues[""] ? <FieldError message={issues[""]} /> : null}
          <Button
            label={`Confirm: ${titles[open].toLowerCase()}`}
            tone={open === "withdraw" ? "danger" : "primary"}
            busy={act.isPending || patch.isPending}
            onPress={run}
            style={styles.left}
          />
        </View>
      ) : null}
      {done ? (
        <Text role="status" style={{ color: colors.fieldDark }}>
          {done}
        </Text>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  buttons: { flexDirection: "row", flexWrap: "wrap", gap: space.sm },
  form: { gap: space.md, paddingTop: space.sm },
  left: { alignSelf: "flex-start" },
});
