import type { z } from "zod";
import { ApiError } from "@/lib/api-error";

/** Field path → first message, e.g. "contributors.0.orcid" → "an ORCID iD looks like …". */
export type FieldIssues = Record<string, string>;

const issuePath = (path: readonly PropertyKey[]) => path.map(String).join(".");

/** The shared schema's issues, keyed by the path the form uses for each input. */
export function zodFieldIssues(error: z.ZodError): FieldIssues {
  const out: FieldIssues = {};
  for (const issue of error.issues) out[issuePath(issue.path)] ??= issue.message;
  return out;
}

/**
 * What the server said about the fields (problem+json `errors[].field` such as "body.title"). Errors without a
 * field come back under "" so the form can show them above the buttons.
 */
export function serverFieldIssues(error: unknown): FieldIssues {
  if (!(error instanceof ApiError)) return { "": error instanceof Error ? error.message : "The request failed." };
  const fields = error.fieldErrors();
  if (Object.keys(fields).length === 0) return { "": error.message };
  return fields;
}

/** Issues under a prefix, with the prefix removed ("contributors.1." → "name"). */
export function issuesUnder(issues: FieldIssues, prefix: string): FieldIssues {
  const out: FieldIssues = {};
  for (const [key, message] of Object.entries(issues)) if (key.startsWith(prefix)) out[key.slice(prefix.length)] = message;
  return out;
}
