import { readdirSync, statSync } from "node:fs";
import path from "node:path";
import { isTypedRoute, matchDynamicName, stripInvisibleSegmentsFromPath, removeSupportedExtensions } from "expo-router/build/matchers";

const appRoutesDir = path.resolve(__dirname, "../app");

export interface AppRoute {
  /** The route file, relative to app/ and without its extension ("datasets/[slug]"). */
  file: string;
  /** The address pattern Expo Router gives that file ("/datasets/[slug]"). */
  pattern: string;
  regex: RegExp;
}

function routeFiles(dir: string, prefix = ""): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) return routeFiles(full, `${prefix}${name}/`);
    return /\.[jt]sx?$/.test(name) ? [`${prefix}${name}`] : [];
  });
}

const escapeRegex = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");

/**
 * The screens' addresses, read from the route files in app/ with Expo Router's own file-name rules (groups and
 * `index` are invisible, `[x]` is one segment, `[...x]` any number; layouts, `+not-found` and `+html` are not
 * screens). The server answers 404 for a path none of them matches, so this list is never written by hand.
 */
export function appRoutes(dir = appRoutesDir): AppRoute[] {
  return routeFiles(dir)
    .filter((f) => isTypedRoute(f) && !/\.(web|native|ios|android)\.[jt]sx?$/.test(f))
    .map((f) => {
      const file = removeSupportedExtensions(f);
      const segments = stripInvisibleSegmentsFromPath(file).split("/").filter(Boolean);
      const pattern = `/${segments.join("/")}`;
      const source = segments
        .map((s) => {
          const dynamic = matchDynamicName(s);
          if (!dynamic) return `/${escapeRegex(s)}`;
          return dynamic.deep ? "(?:/[^/]+)+" : "/[^/]+";
        })
        .join("");
      return { file, pattern, regex: new RegExp(`^${source}/?$`) };
    });
}

/** Whether an address opens one of the app's screens (otherwise the app draws its not-found screen). */
export function appRouteMatcher(dir = appRoutesDir): (pathname: string) => boolean {
  const routes = appRoutes(dir);
  return (pathname) => routes.some((r) => r.regex.test(pathname));
}
