import type { Problem } from "@/schemas/problem";

/** An API answer that was not OK, with the problem+json body when the server sent one. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly problem: Problem | null,
    message: string,
  ) {
    super(message);
    this.name = "ApiError";
  }
  get offline() {
    return this.status === 0;
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
