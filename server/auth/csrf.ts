import type { RequestHandler } from "express";
import { forbidden, HttpProblem } from "@/server/errors";

const safeMethods = new Set(["GET", "HEAD", "OPTIONS"]);

function originOf(value: string): string | null {
  try {
    return new URL(value).origin;
  } catch {
    return null;
  }
}

/**
 * Cross-site request forgery guard for writes that ride on the browser's cookie (or on no credential at all, which
 * covers sign-in and sign-up). Bearer-token requests are exempt: a browser never attaches a token by itself.
 *
 * Two checks, because each alone has gaps:
 * - the body must be JSON or multipart. A cross-site HTML form can only send urlencoded, multipart or text/plain,
 *   and a cross-site fetch with a JSON body needs a CORS preflight, which this API never grants for writes;
 * - when the browser says where the request comes from (Origin, else Referer), it must be our own public URL.
 *   This closes the multipart form, which the first check lets through. The host the request was sent to counts as
 *   ours as well, so the app also works when reached by its loopback address.
 * A request without Origin or Referer (curl, supertest, an old browser on a same-origin form) is let through;
 * the SameSite=Lax cookie already keeps it from being sent cross-site by modern browsers.
 */
export function csrfGuard(publicUrl: string): RequestHandler {
  const ownOrigin = originOf(publicUrl);
  return (req, _res, next) => {
    if (safeMethods.has(req.method) || req.auth?.via === "token") return next();

    const type = req.headers["content-type"];
    const hasBody = Number(req.headers["content-length"] ?? 0) > 0 || req.headers["transfer-encoding"] !== undefined;
    if (type ? !/^(application\/(json|[\w.+-]+\+json)|multipart\/form-data)\b/i.test(type) : hasBody) {
      return next(
        new HttpProblem(415, "Unsupported media type", "Send the body as application/json (or multipart/form-data for files).", {
          errors: [{ field: "header.content-type", value: type ?? "", message: "must be application/json or multipart/form-data" }],
        }),
      );
    }

    const claimed = req.headers.origin ?? req.headers.referer;
    if (claimed !== undefined) {
      // "null" is what a sandboxed frame or a privacy-stripped redirect sends: never our own page.
      const origin = claimed === "null" ? null : originOf(claimed);
      const addressed = `${req.protocol}://${req.get("host") ?? ""}`;
      if (!origin || (origin !== ownOrigin && origin !== addressed)) {
        return next(forbidden(`Cross-site request refused: it came from ${claimed}, not from ${publicUrl}.`));
      }
    }
    if (req.headers["sec-fetch-site"] === "cross-site") return next(forbidden("Cross-site request refused."));
    next();
  };
}
