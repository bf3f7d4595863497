import type { RateLimitStores } from "@/server/rate-limit-store";
import { createHmac, randomBytes, timingSafeEqual } from "node:crypto";
import type { Request, RequestHandler, Response } from "express";
import { ipKeyGenerator, rateLimit } from "express-rate-limit";
import type { AppConfig } from "../config";

/**
 * The web app's cookie. When the server sends the app's HTML it gives the browser a short-lived, signed, HttpOnly,
 * SameSite=Lax cookie naming a random per-browser id. The API counts requests that carry a valid one against that
 * browser's quota (PLOTBANK_APP_RATE_PER_MIN) instead of the anonymous quota of the address, so ten people behind one
 * office address each have their own. It grants nothing else: no account, no write.
 *
 * Value: `v1.<browser id>.<expiry, unix seconds>.<HMAC-SHA256 of the first three parts with the server secret>`.
 * A forged, altered or expired cookie counts as none (anonymous, per address). A page load with a correctly signed
 * but expired cookie renews it for the same browser id, so reloading the page never resets a browser's count; a
 * browser without one gets a new id, and one address gets at most PLOTBANK_APP_BROWSERS_PER_IP_HOUR new ids an hour.
 * The API renews a valid cookie once half its life has passed, so an open tab keeps it.
 */
export const appCookieName = "pb_app";
export const appCookieLifetimeMs = 2 * 60 * 60_000;

export interface AppBrowser {
  id: string;
  expiresAt: number;
}

const sign = (secret: string, payload: string) => createHmac("sha256", secret).update(payload).digest("base64url");

export function appCookieValue(secret: string, browser: AppBrowser): string {
  const payload = `v1.${browser.id}.${Math.floor(browser.expiresAt / 1000)}`;
  return `${payload}.${sign(secret, payload)}`;
}

/** The cookie's browser, when its signature is right (expired or not); null for a missing, malformed or forged one. */
export function readAppCookie(secret: string, value: unknown): AppBrowser | null {
  if (typeof value !== "string") return null;
  const m = /^v1\.([A-Za-z0-9_-]{22})\.(\d{1,12})\.([A-Za-z0-9_-]{43})$/.exec(value);
  if (!m) return null;
  const expected = Buffer.from(sign(secret, `v1.${m[1]}.${m[2]}`));
  const given = Buffer.from(m[3]!);
  if (expected.length !== given.length || !timingSafeEqual(expected, given)) return null;
  return { id: m[1]!, expiresAt: Number(m[2]) * 1000 };
}

function setAppCookie(res: Response, config: Pick<AppConfig, "secret" | "publicUrl">, id: string, now: number) {
  const browser = { id, expiresAt: now + appCookieLifetimeMs };
  res.cookie(appCookieName, appCookieValue(config.secret, browser), {
    httpOnly: true,
    sameSite: "lax",
    secure: config.publicUrl.startsWith("https:"),
    path: "/",
    maxAge: appCookieLifetimeMs,
  });
  return browser;
}

const needsRenewal = (b: AppBrowser, now: number) => b.expiresAt - now < appCookieLifetimeMs / 2;

/**
 * On every page of the web app: keep, renew or issue the app cookie. New ids are limited per address; past the limit
 * the page is served without one and that browser's requests count as anonymous.
 */
export function appCookieOnPages(
  config: Pick<AppConfig, "secret" | "publicUrl" | "appBrowsersPerIpHour">,
  stores: RateLimitStores = () => undefined,
): RequestHandler[] {
  const newBrowsers = rateLimit({
    store: stores("app-browsers"),
    windowMs: 60 * 60_000,
    limit: config.appBrowsersPerIpHour,
    identifier: "app-browsers",
    standardHeaders: false,
    legacyHeaders: false,
    // Only pages that would get a new id count.
    skip: (req) => readAppCookie(config.secret, req.cookies?.[appCookieName]) !== null,
    keyGenerator: (req) => `ip:${ipKeyGenerator(req.ip ?? "")}`,
    handler: (_req, res, next) => {
      res.locals.noNewAppBrowser = true;
      next();
    },
  });
  const issue: RequestHandler = (req, res, next) => {
    const now = Date.now();
    const current = readAppCookie(config.secret, req.cookies?.[appCookieName]);
    if (current && !needsRenewal(current, now)) return next();
    if (current) setAppCookie(res, config, current.id, now);
    else if (!res.locals.noNewAppBrowser) setAppCookie(res, config, randomBytes(16).toString("base64url"), now);
    next();
  };
  return [newBrowsers, issue];
}

/** On the API: note the browser of a valid app cookie for the rate limits, and renew it past half its life. */
export function appCookieOnApi(config: Pick<AppConfig, "secret" | "publicUrl">): RequestHandler {
  return (req: Request, res, next) => {
    const now = Date.now();
    const browser = readAppCookie(config.secret, req.cookies?.[appCookieName]);
    if (browser && browser.expiresAt > now) {
      req.appBrowser = needsRenewal(browser, now) ? setAppCookie(res, config, browser.id, now) : browser;
    }
    next();
  };
}
