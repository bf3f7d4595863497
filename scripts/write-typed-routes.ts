/**
 * Writes expo-router's typed-routes declarations for the routes in app/ (what `expo start` writes to .expo/types when
 * experiments.typedRoutes is on), so a clean clone type-checks links without starting Expo first. The generator ships
 * inside Expo's CLI; it reads no network. Run it after adding, renaming or removing a route:
 *   node --import tsx scripts/write-typed-routes.ts [output folder, default types/generated]
 */
import { mkdirSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";

const root = path.resolve(__dirname, "..");
const out = path.resolve(process.argv[2] ?? path.join(root, "types/generated"));
process.env.EXPO_ROUTER_APP_ROOT = path.join(root, "app");

// @expo/router-server is a dependency of Expo's CLI, not of ours: resolve it from there.
const fromCli = createRequire(createRequire(require.resolve("expo/package.json")).resolve("@expo/cli/package.json"));
const generator = fromCli("@expo/router-server/build/typed-routes") as {
  regenerateDeclarations: (outputDir: string, options?: object) => void;
};

mkdirSync(out, { recursive: true });
generator.regenerateDeclarations(out, { partialTypedGroups: false });
// regenerateDeclarations is debounced by one second; the process stays alive until its timer has written the file.
console.log(`typed routes: writing ${path.join(out, "router.d.ts")}`);
