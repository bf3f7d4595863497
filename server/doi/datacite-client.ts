import type { DataCiteAttributes, DataCiteDoiDocument, DataCiteError } from "./datacite-metadata";

export interface DataCiteClientOptions {
  /** Base URL of the DataCite-compatible REST API, e.g. the local fake's loopback URL. */
  url: string;
  user: string;
  password: string;
  timeoutMs?: number;
}

/**
 * A failed call. `status` is 0 when the service could not be reached. `permanent` says retrying the same
 * metadata cannot help (the service refused it as invalid); anything else is worth trying again later.
 */
export class DataCiteRequestError extends Error {
  constructor(
    readonly status: number,
    readonly errors: DataCiteError[],
    message: string,
  ) {
    super(message);
  }
  get permanent() {
    return this.status === 400 || this.status === 422;
  }
  get alreadyTaken() {
    return this.status === 422 && this.errors.some((e) => /already been taken/i.test(e.title));
  }
}

export interface DataCiteClient {
  createDoi(attributes: DataCiteAttributes): Promise<DataCiteAttributes>;
  updateDoi(doi: string, attributes: DataCiteAttributes): Promise<DataCiteAttributes>;
  getDoi(doi: string): Promise<DataCiteAttributes>;
}

export function createDataCiteClient({ url, user, password, timeoutMs = 10_000 }: DataCiteClientOptions): DataCiteClient {
  const base = url.replace(/\/$/, "");
  const authorization = `Basic ${Buffer.from(`${user}:${password}`).toString("base64")}`;

  async function call(method: "GET" | "POST" | "PUT", path: string, body?: DataCiteDoiDocument): Promise<DataCiteAttributes> {
    let res: Response;
    try {
      res = await fetch(`${base}${path}`, {
        method,
        headers: {
          Authorization: authorization,
          Accept: "application/vnd.api+json",
          ...(body ? { "Content-Type": "application/vnd.api+json" } : {}),
        },
        body: body ? JSON.stringify(body) : undefined,
        signal: AbortSignal.timeout(timeoutMs),
      });
    } catch (error) {
      const cause = (error as { cause?: { code?: string } }).cause?.code ?? (error as Error).name;
      throw new DataCiteRequestError(0, [], `The DOI service at ${base} could not be reached (${cause}).`);
    }
    const text = await res.text();
    let json: unknown;
    try {
      json = text ? JSON.parse(text) : undefined;
    } catch {
      json = undefined;
    }
    if (!res.ok) {
      const errors = ((json as { errors?: DataCiteError[] } | undefined)?.errors ?? []).filter((e) => typeof e?.title === "string");
      const said = errors.map((e) => (e.source ? `${e.source}: ${e.title}` : e.title)).join("; ");
      throw new DataCiteRequestError(
        res.status,
        errors,
        `The DOI service answered ${res.status} to ${method} ${path}${said ? `: ${said}` : ""}.`,
      );
    }
    const attributes = (json as DataCiteDoiDocument | undefined)?.data?.attributes;
    if (!attributes) throw new DataCiteRequestError(res.status, [], `The DOI service answered ${method} ${path} without a DOI document.`);
    return attributes;
  }

  const doiPath = (doi: string) => `/dois/${encodeURIComponent(doi)}`;
  return {
    createDoi: (attributes) => call("POST", "/dois", { data: { type: "dois", attributes } }),
    updateDoi: (doi, attributes) => call("PUT", doiPath(doi), { data: { id: doi, type: "dois", attributes } }),
    getDoi: (doi) => call("GET", doiPath(doi)),
  };
}
