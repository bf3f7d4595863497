import { OpenAPIRegistry, OpenApiGeneratorV31 } from "@asteasolutions/zod-to-openapi";
import { problemSchema } from "@/schemas/problem";

export type Registry = OpenAPIRegistry;

export function createRegistry(): OpenAPIRegistry {
  const registry = new OpenAPIRegistry();
  registry.registerComponent("securitySchemes", "bearerToken", {
    type: "http",
    scheme: "bearer",
    description: "An API token made on the Tokens screen. Send it as `Authorization: Bearer pb_…`.",
  });
  registry.registerComponent("securitySchemes", "sessionCookie", {
    type: "apiKey",
    in: "cookie",
    name: "pb_session",
    description: "The web app's sign-in session.",
  });
  // Rate-limited operations name these on every response (defineRoute adds them); Retry-After comes with a 429.
  registry.registerComponent("headers", "RateLimit", {
    description:
      'What is left of the caller\'s quota in this window (IETF RateLimit header fields): `"anonymous"; r=59; t=60` (remaining ' +
      "requests, seconds to the reset) for the API quotas; `limit=5, remaining=4, reset=60` (draft 7) on sign-in and e-mailed-link requests",
    schema: { type: "string" },
  });
  registry.registerComponent("headers", "RateLimit-Policy", {
    description:
      'The quota that applies to the caller: `"anonymous"; q=60; w=60` (requests per window of seconds), or `5;w=60` on sign-in and e-mailed-link requests',
    schema: { type: "string" },
  });
  registry.registerComponent("headers", "Retry-After", {
    description: "Seconds to wait before trying again",
    schema: { type: "integer", minimum: 0 },
  });
  return registry;
}

/** Standard error answers, to spread into a path's `responses`. */
export const problemResponses = (...statuses: number[]) =>
  Object.fromEntries(
    statuses.map((status) => [
      status,
      { description: problemDescriptions[status] ?? "Problem", content: { "application/problem+json": { schema: problemSchema } } },
    ]),
  );

/** One error answer with a description of its own, e.g. the 410 of a used link. */
export const problemResponse = (status: number, description: string) => ({
  [status]: { description, content: { "application/problem+json": { schema: problemSchema } } },
});

const problemDescriptions: Record<number, string> = {
  400: "A parameter or the body is not valid; `errors` names each field.",
  401: "No valid session or token.",
  403: "The role or token scope does not allow this.",
  404: "Not found.",
  409: "The resource's state does not allow this.",
  413: "The body is larger than the limit.",
  415: "The body is not of a media type this operation accepts (JSON, or multipart for uploads).",
  422: "The request is valid but cannot be answered as asked (e.g. site-years on different scales); `detail` says what to change.",
  429: "Over the rate limit; see Retry-After.",
  500: "The server failed; the problem carries no detail of the failure.",
};

export function generateOpenApiDocument(registry: OpenAPIRegistry, version: string, serverUrl = "/") {
  return new OpenApiGeneratorV31(registry.definitions).generateDocument({
    openapi: "3.1.0",
    info: {
      title: "Plotbank open-data API",
      version,
      description:
        "Versioned fertilizer field-trial data: datasets, site-years, treatments, plot observations, site-year responses " +
        "against the untreated check, and random-effects meta-analyses, all with one set of typed filters. " +
        "Published data are open to everyone (CC BY 4.0 unless a version says otherwise); tokens raise the rate limit " +
        "and allow writes for curators. Quotas (see the RateLimit-Policy header): anonymous callers 60 requests a minute " +
        "per IP address; the web app's own requests, which carry its signed HttpOnly `pb_app` cookie (HMAC, per browser, " +
        "2 hours; a forged or expired one counts as none), 600 a minute per browser; tokens and signed-in users 1,000 " +
        "a minute. A 304 counts against no quota. Results summarise the trials in the data: a field can differ, seed-placed " +
        "fertilizer can injure a stand, and local recommendations and licensed advisers have the last word.",
      license: { name: "API: MIT; data: per version (default CC BY 4.0)" },
    },
    servers: [{ url: serverUrl }],
  });
}
