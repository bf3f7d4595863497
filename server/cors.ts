import cors from "cors";
import type { Request, RequestHandler } from "express";

const readMethods = new Set(["GET", "HEAD"]);

/** A read, or a browser's preflight asking whether it may send one. */
function isRead(req: Request): boolean {
  if (readMethods.has(req.method)) return true;
  const asked = req.headers["access-control-request-method"];
  return req.method === "OPTIONS" && typeof asked === "string" && readMethods.has(asked.toUpperCase());
}

const openToAnyOrigin = cors({
  origin: "*",
  methods: ["GET", "HEAD"],
  exposedHeaders: ["ETag", "Link", "Retry-After", "RateLimit", "RateLimit-Policy"],
});

/**
 * The public read API is open to any origin; writes are same-origin only. Only reads (and their preflights) get
 * CORS headers: a POST, PATCH or DELETE response never carries Access-Control-Allow-Origin, and the preflight for
 * one is answered with no CORS headers at all, so a browser on another origin does not send it.
 */
export function publicReadCors(): RequestHandler {
  return (req, res, next) => {
    if (isRead(req)) return openToAnyOrigin(req, res, next);
    if (req.method === "OPTIONS") {
      res.status(204).end();
      return;
    }
    next();
  };
}
