import type { ErrorRequestHandler, RequestHandler } from "express";
import { z } from "zod";

/** One located problem: which field, and for uploads which file, row and column. */
export interface ProblemLocation {
  field?: string;
  file?: string;
  row?: number;
  column?: string;
  value?: string;
  message: string;
}

/**
 * An RFC 9457 problem. Throw it from any handler; the problem middleware writes it as application/problem+json.
 */
export class HttpProblem extends Error {
  constructor(
    readonly status: number,
    readonly title: string,
    readonly detail?: string,
    readonly extra: { errors?: ProblemLocation[]; type?: string; headers?: Record<string, string> } & Record<string, unknown> = {},
  ) {
    super(detail ?? title);
  }
}

export const badRequest = (detail: string, errors?: ProblemLocation[]) =>
  new HttpProblem(400, "Bad request", detail, errors ? { errors } : {});
export const unauthorized = (detail = "Sign in, or send a valid API token.") => new HttpProblem(401, "Unauthorized", detail);
export const forbidden = (detail = "Your role does not allow this.") => new HttpProblem(403, "Forbidden", detail);
export const notFound = (detail = "Nothing is here.") => new HttpProblem(404, "Not found", detail);
export const conflict = (detail: string, errors?: ProblemLocation[]) => new HttpProblem(409, "Conflict", detail, errors ? { errors } : {});

/** Turn zod issues into located problems; `where` prefixes the field path (query, body, …). */
export function zodProblems(error: z.ZodError, where: string): ProblemLocation[] {
  return error.issues.flatMap((issue) => {
    const path = issue.path.map(String).join(".");
    const at = path ? `${where}.${path}` : where;
    // An unknown key is named itself, so a typo in `?placment=` points at `query.placment`, not at the whole query.
    if (issue.code === "unrecognized_keys") {
      return issue.keys.map((key) => ({
        field: `${at}.${key}`,
        message: `"${key}" is not a known ${where === "query" ? "parameter" : "field"} here`,
      }));
    }
    return [{ field: at, message: issue.message }];
  });
}

/** A PostgreSQL unique violation (23505), as PGlite or pg raise it, possibly wrapped by drizzle as the cause. */
export function isUniqueViolation(error: unknown): boolean {
  for (let e = error as { code?: string; cause?: unknown } | undefined, depth = 0; e && depth < 4; e = e.cause as typeof e, depth++) {
    if (e.code === "23505") return true;
  }
  return false;
}

const statusTitles: Record<number, string> = {
  400: "Bad request",
  401: "Unauthorized",
  403: "Forbidden",
  404: "Not found",
  405: "Method not allowed",
  409: "Conflict",
  413: "Content too large",
  415: "Unsupported media type",
  422: "Unprocessable content",
  429: "Too many requests",
  500: "Internal server error",
};

function sendProblem(
  res: Parameters<RequestHandler>[1],
  status: number,
  body: { title?: string; detail?: string; type?: string; instance?: string } & Record<string, unknown>,
) {
  // A route may have set a public Cache-Control before it failed; an error must never be kept by a shared cache.
  res.removeHeader("ETag");
  res
    .status(status)
    .set("Cache-Control", "no-store")
    .type("application/problem+json")
    .json({ type: body.type ?? "about:blank", title: body.title ?? statusTitles[status] ?? "Error", status, ...body });
}

export const notFoundHandler: RequestHandler = (req, res) => {
  sendProblem(res, 404, { detail: `No API route matches ${req.method} ${req.path}.`, instance: req.originalUrl });
};

interface HttpLikeError {
  status?: number;
  statusCode?: number;
  type?: string;
  limit?: number;
  expose?: boolean;
  code?: string;
  hint?: string;
}

/** The one place errors become responses. Nothing about the server's internals leaves it. */
export const problemMiddleware: ErrorRequestHandler = (err: unknown, req, res, next) => {
  if (res.headersSent) return next(err);
  if (err instanceof HttpProblem) {
    const { headers, ...extra } = err.extra;
    for (const [k, v] of Object.entries(headers ?? {})) res.setHeader(k, v);
    return sendProblem(res, err.status, { title: err.title, detail: err.detail, instance: req.originalUrl, ...extra });
  }
  if (err instanceof z.ZodError) {
    return sendProblem(res, 400, { detail: "The request is not valid.", errors: zodProblems(err, "request"), instance: req.originalUrl });
  }
  const e = (err ?? {}) as HttpLikeError;
  // body-parser errors carry a status and a type; report them plainly.
  if (e.type === "entity.too.large") {
    return sendProblem(res, 413, { detail: `The request body is larger than the limit of ${e.limit} bytes.`, limit: e.limit });
  }
  if (e.type === "entity.parse.failed") {
    return sendProblem(res, 400, { detail: "The request body is not valid JSON.", errors: [{ field: "body", message: "malformed JSON" }] });
  }
  // Text PostgreSQL cannot hold (U+0000) that got past the contract: still the client's input, never a 500.
  if (e.code === "22021" || e.code === "22P05" || (err as { cause?: HttpLikeError })?.cause?.code === "22021") {
    return sendProblem(res, 400, {
      detail: "The request holds a character the database cannot store (U+0000).",
      instance: req.originalUrl,
    });
  }
  // A write that hit the database's own immutability guard.
  if (e.hint === "plotbank:immutable") {
    return sendProblem(res, 409, { detail: (err as Error).message, instance: req.originalUrl });
  }
  const status = e.status ?? e.statusCode;
  if (status && status >= 400 && status < 500) {
    return sendProblem(res, status, { detail: e.expose ? (err as Error).message : undefined, instance: req.originalUrl });
  }
  if (process.env.NODE_ENV !== "test" || process.env.PLOTBANK_LOG_ERRORS) console.error(err);
  return sendProblem(res, 500, { detail: "Something went wrong on the server. It has been logged.", instance: req.originalUrl });
};
