import * as Clipboard from "expo-clipboard";
import { Link, useLocalSearchParams } from "expo-router";
import { useMemo, useState } from "react";
import { Platform, Pressable, StyleSheet, View } from "react-native";
import { TextField } from "@/components/ui/text-field";
import { Screen } from "@/components/screen";
import { Button } from "@/components/ui/button";
import { Card } from "@/components/ui/card";
import { ServerLink } from "@/components/ui/server-link";
import { EmptyState, ErrorState, LoadingState } from "@/components/ui/state-views";
import { Text } from "@/components/ui/text";
import { colors, fonts, minTap, radius, space } from "@/constants/theme";
import { useSession } from "@/hooks/use-session";
import { useTokenCreateMutation, useTokenList, useTokenRevokeMutation } from "@/hooks/use-tokens";
import { ApiError } from "@/lib/api-error";
import { filtersToQuery, trialFilterShape, trialFilters } from "@/schemas/filters";
import { staffRoles } from "@/constants/vocabulary";
import type { ApiToken, CreatedToken, TokenScope } from "@/schemas/tokens";

const writeRoles: readonly string[] = staffRoles;

/** The filters in this page's URL (as the evidence screen links them), keeping only the valid ones. */
function filtersFromParams(params: Record<string, string | string[] | undefined>): Record<string, string> {
  const known = Object.fromEntries(Object.entries(params).filter(([k, v]) => k in trialFilterShape && v !== undefined));
  const parsed = trialFilters.safeParse(known);
  if (parsed.success) return filtersToQuery(parsed.data);
  // Drop each parameter that fails on its own, keep the rest.
  const keep: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(known)) if (trialFilters.safeParse({ ...keep, [k]: v }).success) keep[k] = v;
  return filtersToQuery(trialFilters.parse(keep));
}

function origin(): string {
  if (Platform.OS === "web" && typeof window !== "undefined") return window.location.origin;
  return "http://localhost:8080";
}

/** Copyable requests for the current filters: JSON with curl, CSV with curl, and fetch in TypeScript. */
function examples(filters: Record<string, string>) {
  const base = origin();
  const qs = new URLSearchParams(filters).toString();
  const url = `${base}/api/v1/responses${qs ? `?${qs}` : ""}`;
  const csvUrl = `${base}/api/v1/observations?${new URLSearchParams({ ...filters, format: "csv" })}`;
  return [
    { title: "Site-year responses as JSON (curl)", code: `curl -H "Authorization: Bearer $PLOTBANK_TOKEN" \\\n  "${url}"` },
    {
      title: "Every matching plot as CSV, streamed (curl)",
      code: `curl -H "Authorization: Bearer $PLOTBANK_TOKEN" \\\n  -o observations.csv "${csvUrl}"`,
    },
    {
      title: "All pages in TypeScript (fetch)",
      code: [
        `let url: string | null = ${JSON.stringify(url)};`,
        "const rows = [];",
        "while (url) {",
        "  const res = await fetch(url, { headers: { Authorization: `Bearer ${process.env.PLOTBANK_TOKEN}` } });",
        "  if (!res.ok) throw new Error(`Plotbank answered ${res.status}: ${await res.text()}`);",
        "  const page = await res.json();",
        "  rows.push(...page.items);",
        `  url = page.nextPageToken ? \`${base}/api/v1/responses?${qs ? `${qs}&` : ""}pageToken=\${page.nextPageToken}\` : null;`,
        "}",
      ].join("\n"),
    },
  ];
}

function CopyButton({ text, label = "Copy" }: { text: string; label?: string }) {
  const [copied, setCopied] = useState(false);
  return (
    <Button
      tone="secondary"
      label={copied ? "Copied" : label}
      accessibilityLabel={label}
      onPress={async () => {
        await Clipboard.setStringAsync(text);
        setCopied(true);
        setTimeout(() => setCopied(false), 2000);
      }}
    />
  );
}

function CodeBlock({ title, code }: { title: string; code: string }) {
  return (
    <View style={styles.codeWrap}>
      <View style={styles.row}>
        <Text variant="subheading" style={{ flex: 1 }}>
          {title}
        </Text>
        <CopyButton text={code} label={`Copy: ${title}`} />
      </View>
      <Text variant="mono" selectable style={styles.code}>
        {code}
      </Text>
    </View>
  );
}

function NewSecret({ created, onDone }: { created: CreatedToken; onDone: () => void }) {
  return (
    <Card style={styles.secretCard} accessibilityLiveRegion="polite">
      <Text variant="subheading">Your new token “{created.token.name}”</Text>
      <Text>
        Copy it now: this is the only time Plotbank shows it. We keep only a fingerprint, so a lost token cannot be shown again — revoke it
        and make another.
      </Text>
      <Text variant="mono" selectable style={styles.code}>
        {created.secret}
      </Text>
      <View style={styles.row}>
        <CopyButton text={created.secret} label="Copy token" />
        <Button tone="quiet" label="I have stored it" onPress={onDone} />
      </View>
    </Card>
  );
}

function TokenForm({ canWrite, onCreated }: { canWrite: boolean; onCreated: (t: CreatedToken) => void }) {
  const [name, setName] = useState("");
  const [scope, setScope] = useState<TokenScope>("read");
  const [days, setDays] = useState("90");
  const create = useTokenCreateMutation();
  const errors = create.error instanceof ApiError ? create.error.fieldErrors() : {};
  return (
    <Card style={{ gap: space.md }}>
      <Text variant="heading">Make a token</Text>
      <TextField label="Name" value={name} onChangeText={setName} placeholder="e.g. nightly pull" maxLength={100} error={errors.name} />
      <View style={{ gap: space.xs }}>
        <Text variant="label">Scope</Text>
        <View style={styles.row} role="radiogroup" accessibilityLabel="Scope">
          {(canWrite ? (["read", "write"] as const) : (["read"] as const)).map((s) => (
            <Pressable
              key={s}
              role="radio"
              aria-checked={scope === s}
              onPress={() => setScope(s)}
              style={[styles.choice, scope === s && styles.choiceOn]}
            >
              <Text style={scope === s ? styles.choiceTextOn : undefined}>{s === "read" ? "Read data" : "Read and write (curation)"}</Text>
            </Pressable>
          ))}
        </View>
        {errors.scope ? <Text style={styles.error}>{errors.scope}</Text> : null}
      </View>
      <View style={{ maxWidth: 240 }}>
        <TextField
          label="Expires after (days, 1–365)"
          value={days}
          onChangeText={setDays}
          inputMode="numeric"
          error={errors.expiresInDays}
        />
      </View>
      {create.error && !Object.keys(errors).length ? <Text style={styles.error}>{create.error.message}</Text> : null}
      <Button
        label="Make token"
        busy={create.isPending}
        style={{ alignSelf: "flex-start" }}
        onPress={() =>
          create.mutate(
            { name, scope, expiresInDays: Number(days) },
            {
              onSuccess: (created) => {
                setName("");
                onCreated(created);
              },
            },
          )
        }
      />
    </Card>
  );
}

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleDateString() : "—");

function TokenRow({ token }: { token: ApiToken }) {
  const revoke = useTokenRevokeMutation();
  return (
    <View style={styles.tokenRow}>
      <View style={{ flex: 1, gap: 2, minWidth: 200 }}>
        <Text variant="subheading">{token.name}</Text>
        <Text variant="mono">{token.prefix}…</Text>
        <Text variant="caption">
          {token.scope} · {token.status} · made {when(token.createdAt)} · expires {when(token.expiresAt)} · last used{" "}
          {when(token.lastUsedAt)}
          {token.revokedAt ? ` · revoked ${when(token.revokedAt)}` : ""}
        </Text>
      </View>
      {token.status === "active" ? (
        <Button
          tone="danger"
          label="Revoke"
          accessibilityLabel={`Revoke ${token.name}`}
          busy={revoke.isPending}
          onPress={() => revoke.mutate(token.id)}
        />
      ) : null}
    </View>
  );
}

function TokenList() {
  const tokens = useTokenList();
  if (tokens.isPending) return <LoadingState label="Loading your tokens…" />;
  if (tokens.isError) return <ErrorState error={tokens.error} onRetry={() => tokens.refetch()} />;
  if (tokens.data.items.length === 0)
    return <EmptyState title="No tokens yet" hint="Make one above to raise your rate limit to the per-token quota." />;
  return (
    <Card style={{ gap: 0, paddingVertical: 0 }}>
      {tokens.data.items.map((t) => (
        <TokenRow key={t.id} token={t} />
      ))}
    </Card>
  );
}

export default function DevelopersScreen() {
  const session = useSession();
  const params = useLocalSearchParams();
  const filters = useMemo(() => filtersFromParams(params), [params]);
  const [created, setCreated] = useState<CreatedToken | null>(null);
  const user = session.data;
  return (
    <Screen
      title="Developers"
      subtitle="Pull the same numbers the app shows: typed filters, JSON or streamed CSV, cursor paging, OpenAPI 3.1."
    >
      <View style={styles.row}>
        <ServerLink href="/api/docs/" label="Interactive API reference" testID="api-docs-link" />
        <ServerLink href="/api/v1/openapi.json" label="OpenAPI document" testID="openapi-link" />
      </View>
      <Text variant="heading">API tokens</Text>
      {session.isPending ? (
        <LoadingState />
      ) : !user ? (
        <EmptyState
          title="Sign in to make API tokens"
          hint="Published data are open without a token, at a lower rate limit. A token raises it and identifies your scripts."
          action={
            <Link href="/sign-in" style={styles.link}>
              Sign in
            </Link>
          }
        />
      ) : (
        <>
          {created ? <NewSecret created={created} onDone={() => setCreated(null)} /> : null}
          <TokenForm canWrite={writeRoles.includes(user.role)} onCreated={setCreated} />
          <TokenList />
        </>
      )}
      <Text variant="heading">Example requests</Text>
      <Text variant="caption">
        {Object.keys(filters).length
          ? `Built from the filters in this page's address: ${new URLSearchParams(filters).toString()}.`
          : "Add filters to this page's address (for example ?crop=soybean&placement=2x2-band&soilTestClass=low) and the examples follow."}{" "}
        Data are CC BY 4.0 unless a version says otherwise; every row names its dataset and version, so cite those.
      </Text>
      {examples(filters).map((e) => (
        <CodeBlock key={e.title} title={e.title} code={e.code} />
      ))}
    </Screen>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: "row", flexWrap: "wrap", alignItems: "center", gap: space.sm },
  link: { color: colors.info, fontFamily: fonts.medium, textDecorationLine: "underline", minHeight: minTap, paddingVertical: space.sm },
  choice: {
    minHeight: minTap,
    paddingHorizontal: space.md,
    justifyContent: "center",
    borderWidth: 1,
    borderColor: colors.line,
    borderRadius: radius.md,
    backgroundColor: colors.card,
  },
  choiceOn: { backgroundColor: colors.field, borderColor: colors.field },
  choiceTextOn: { color: "#fff" },
  error: { color: colors.danger },
  secretCard: { gap: space.sm, borderColor: colors.wheat, borderWidth: 2, backgroundColor: colors.wheatTint },
  code: { backgroundColor: colors.card, borderWidth: 1, borderColor: colors.line, borderRadius: radius.sm, padding: space.md },
  codeWrap: { gap: space.sm },
  tokenRow: {
    flexDirection: "row",
    flexWrap: "wrap",
    alignItems: "center",
    gap: space.md,
    paddingVertical: space.md,
    borderBottomWidth: 1,
    borderBottomColor: colors.line,
  },
});
