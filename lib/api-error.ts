import type { Problem } from "@/schemas/problem";

/**
 * What went wrong with an API call:
 * - `offline`: no answer at all (network down, server unreachable);
 * - `status`: an answer that was not OK, with its problem+json when the server sent one;
 * - `shape`: an OK answer whose JSON is not what the shared schema describes (usually an app older or newer than
 *   the server);
 * - `not-json`: an OK answer that is not JSON at all (a captive portal's or a proxy's page, say).
 */
export type ApiErrorKind = "offline" | "status" | "shape" | "not-json";

/** Every failure of an API call, so callers and screens handle one error type. */
export class ApiError extends Error {
  readonly kind: ApiErrorKind;
  constructor(
    readonly status: number,
    readonly problem: Problem | null,
    message: string,
    options: { kind?: ApiErrorKind; cause?: unknown } = {},
  ) {
    super(message, options.cause === undefined ? undefined : { cause: options.cause });
    this.name = "ApiError";
    this.kind = options.kind ?? (status === 0 ? "offline" : "status");
  }
  get offline() {
    return this.kind === "offline";
  }
  /** "body.email" → message, for showing errors at their fields. */
  fieldErrors(prefix = "body."): Record<string, string> {
    const out: Record<string, string> = {};
    for (const e of this.problem?.errors ?? []) {
      if (e.field?.startsWith(prefix)) out[e.field.slice(prefix.length)] ??= e.message;
    }
    return out;
  }
}
