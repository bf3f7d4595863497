import type { Request } from "express";
import { z } from "zod";
import { hasControlCharacter } from "@/schemas/safe-text";
import { HttpProblem, zodProblems } from "./errors";

const hasBody = (req: Request) => req.headers["transfer-encoding"] !== undefined || Number(req.headers["content-length"] ?? 0) > 0;

/** Parse the query string with a strict schema: unknown or ill-typed parameters are a 400 naming them. */
export function parseQuery<T extends z.ZodType>(schema: T, req: Request): z.infer<T> {
  const result = schema.safeParse(req.query);
  if (!result.success) {
    throw new HttpProblem(400, "Bad request", "A query parameter is not valid.", { errors: zodProblems(result.error, "query") });
  }
  return result.data;
}

export function parseBody<T extends z.ZodType>(schema: T, req: Request): z.infer<T> {
  // express.json() leaves a body of any other type unread: answering as if it were empty would silently drop it.
  if (req.body === undefined && hasBody(req)) {
    throw new HttpProblem(
      415,
      "Unsupported media type",
      `Send the request body as application/json (it came as ${req.headers["content-type"] ?? "no type"}).`,
      {
        errors: [{ field: "body", message: "not application/json" }],
      },
    );
  }
  const result = schema.safeParse(req.body ?? {});
  if (!result.success) {
    throw new HttpProblem(400, "Bad request", "The request body is not valid.", { errors: zodProblems(result.error, "body") });
  }
  return result.data;
}

export function parseParams<T extends z.ZodType>(schema: T, req: Request): z.infer<T> {
  // A path segment is one line of text in every route; a control character in it is a bad request, not a lookup.
  for (const [name, value] of Object.entries(req.params ?? {})) {
    if (typeof value === "string" && hasControlCharacter(value)) {
      throw new HttpProblem(400, "Bad request", "A path parameter holds a control character.", {
        errors: [{ field: `path.${name}`, message: "contains a control character; a path segment is one line of text" }],
      });
    }
  }
  const result = schema.safeParse(req.params);
  if (!result.success) {
    throw new HttpProblem(404, "Not found", "The path does not name an existing resource.", { errors: zodProblems(result.error, "path") });
  }
  return result.data;
}
