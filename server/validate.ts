import type { Request } from "express";
import { z } from "zod";
import { HttpProblem, zodProblems } from "./errors";

/** Parse the query string with a strict schema: unknown or ill-typed parameters are a 400 naming them. */
export function parseQuery<T extends z.ZodType>(schema: T, req: Request): z.infer<T> {
  const result = schema.safeParse(req.query);
  if (!result.success) {
    throw new HttpProblem(400, "Bad request", "A query parameter is not valid.", { errors: zodProblems(result.error, "query") });
  }
  return result.data;
}

export function parseBody<T extends z.ZodType>(schema: T, req: Request): z.infer<T> {
  const result = schema.safeParse(req.body ?? {});
  if (!result.success) {
    throw new HttpProblem(400, "Bad request", "The request body is not valid.", { errors: zodProblems(result.error, "body") });
  }
  return result.data;
}

export function parseParams<T extends z.ZodType>(schema: T, req: Request): z.infer<T> {
  const result = schema.safeParse(req.params);
  if (!result.success) {
    throw new HttpProblem(404, "Not found", "The path does not name an existing resource.", { errors: zodProblems(result.error, "path") });
  }
  return result.data;
}
