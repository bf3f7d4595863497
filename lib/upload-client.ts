import { apiUrl } from "@/lib/api-client";
import { ApiError } from "@/lib/api-error";
import { problemSchema } from "@/schemas/problem";

/**
 * A CSV the curator picked. On the web it is the browser's File; on a phone, the document picker's local URI, which
 * React Native's FormData streams from disk.
 */
export type PickedFile =
  | { kind: "web"; name: string; size: number; blob: Blob }
  | { kind: "native"; name: string; size: number | null; uri: string; mimeType: string };

/**
 * Posts a multipart upload with XMLHttpRequest rather than fetch, because only XHR reports upload progress
 * (`upload.onprogress`) in browsers and in React Native alike. Text fields go before the file so the server knows the
 * resource and options before the first CSV byte arrives.
 *
 * Resolves with the parsed JSON of a 2xx answer, and also of a 422 that carries a validation result (a rejected file is
 * an answer to show, not a failure): that answer is problem+json whose `errors` lists the located problems, with the
 * counts in `errorCount`/`warningCount`, so it is reshaped to the upload result's counts. Anything else rejects with an
 * ApiError carrying the problem+json.
 */
export function uploadWithProgress(
  path: string,
  fields: Record<string, string | PickedFile>,
  onProgress?: (fraction: number) => void,
): Promise<unknown> {
  const form = new FormData();
  const files: [string, PickedFile][] = [];
  for (const [key, value] of Object.entries(fields)) {
    if (typeof value === "string") form.append(key, value);
    else files.push([key, value]);
  }
  for (const [key, picked] of files) {
    if (picked.kind === "web") form.append(key, picked.blob, picked.name);
    // React Native's FormData takes this descriptor in place of a Blob.
    else form.append(key, { uri: picked.uri, name: picked.name, type: picked.mimeType } as unknown as Blob);
  }

  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open("POST", apiUrl(path));
    xhr.withCredentials = true;
    xhr.setRequestHeader("Accept", "application/json");
    xhr.upload.onprogress = (event) => {
      if (event.lengthComputable && event.total > 0) onProgress?.(event.loaded / event.total);
    };
    xhr.onerror = () => reject(new ApiError(0, null, "You appear to be offline: the file could not be sent."));
    xhr.onabort = () => reject(new ApiError(0, null, "The upload was cancelled."));
    xhr.onload = () => {
      let body: unknown = null;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        // Not JSON: reported by status below.
      }
      if (xhr.status >= 200 && xhr.status < 300) {
        onProgress?.(1);
        return resolve(body);
      }
      if (xhr.status === 422 && body && typeof body === "object" && ("reportId" in body || "sheets" in body)) {
        const { errorCount, warningCount, ...rest } = body as Record<string, unknown>;
        return resolve({ ...rest, errors: errorCount, warnings: warningCount });
      }
      const problem = problemSchema.safeParse(body);
      const p = problem.success ? problem.data : null;
      reject(new ApiError(xhr.status, p, p?.detail ?? p?.title ?? `The server answered ${xhr.status}.`));
    };
    xhr.send(form);
  });
}
