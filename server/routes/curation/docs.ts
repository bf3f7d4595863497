import type { z } from "zod";

/** Curation routes take a session or a bearer token. */
export const security: Record<string, string[]>[] = [{ sessionCookie: [] }, { bearerToken: [] }];

export const json = <T extends z.ZodType>(schema: T, description: string) => ({ description, content: { "application/json": { schema } } });
