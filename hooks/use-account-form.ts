import { useState } from "react";
import type { z } from "zod";
import { ApiError } from "@/lib/api-error";

type Values<S extends z.ZodObject> = { [K in keyof z.input<S>]: string };

/**
 * A form checked by the same zod schema the server uses. Errors are kept per field, so each input shows its own;
 * the server's located problems (body.password, …) land on the same fields, and anything else goes to `formError`.
 */
export function useAccountForm<S extends z.ZodObject>(schema: S, initial: Values<S>) {
  const [values, setValues] = useState(initial);
  const [errors, setErrors] = useState<Partial<Record<keyof Values<S> & string, string>>>({});
  const [formError, setFormError] = useState<string | null>(null);

  const set = (field: keyof Values<S> & string) => (value: string) => {
    setValues((v) => ({ ...v, [field]: value }));
    setErrors((e) => ({ ...e, [field]: undefined }));
  };

  /** The parsed value, or null after showing what is wrong. Empty optional fields are left out. */
  function validate(): z.infer<S> | null {
    setFormError(null);
    const candidate = Object.fromEntries(Object.entries(values).filter(([, v]) => v !== ""));
    const result = schema.safeParse(candidate);
    if (result.success) {
      setErrors({});
      return result.data;
    }
    const next: Record<string, string> = {};
    for (const issue of result.error.issues) {
      const key = String(issue.path[0] ?? "");
      next[key] ??= issue.message;
    }
    setErrors(next as typeof errors);
    return null;
  }

  function showServerError(error: unknown) {
    if (error instanceof ApiError) {
      const fields = error.fieldErrors();
      const known = Object.keys(fields).filter((k) => k in values);
      setErrors(Object.fromEntries(known.map((k) => [k, fields[k]])) as typeof errors);
      // A problem about a field of this form is shown there; anything else (an expired link, a rate limit) above it.
      setFormError(known.length ? null : error.message);
    } else {
      setFormError(error instanceof Error ? error.message : "The request failed.");
    }
  }

  return { values, set, errors, formError, setFormError, validate, showServerError, reset: () => setValues(initial) };
}
