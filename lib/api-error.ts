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
  /** When the answer came (ms since the epoch), to count down a Retry-After from. */
  readonly at = Date.now();
  /** Seconds the server asked to wait (Retry-After of a 429). */
  readonly retryAfter?: number;
  constructor(
    readonly status: number,
    readonly problem: Problem | null,
    message: string,
    options: { kind?: ApiErrorKind; cause?: unknown; retryAfter?: number } = {},
  ) {
    super(message, options.cause === undefined ? undefined : { cause: options.cause });
    this.name = "ApiError";
    this.kind = options.kind ?? (status === 0 ? "offline" : "status");
    this.retryAfter = options.retryAfter;
  }
  get offline() {
    return this.kind === "offline";
  }
  /** Over a rate limit (429): wait retryAfter seconds and ask again. */
  get busy() {
    return this.status === 429;
  }
  /** When to ask again after a 429. */
  get retryAt() {
    return this.at + (this.retryAfter ?? 60) * 1000;
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
