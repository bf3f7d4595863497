import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";

// Provenance of the shipped fonts. assets/fonts holds Inter (© The Inter Project Authors, SIL Open Font License 1.1)
// as copies of the TTFs in the @expo-google-fonts/inter package, a pinned dev dependency kept only so this test can
// prove the copies are untouched. The app loads the copies (constants/fonts.ts); importing the package's index would
// bundle all 18 weights.
const root = path.resolve(__dirname, "../..");
const fontsDir = path.join(root, "assets/fonts");
const packageDir = path.join(root, "node_modules/@expo-google-fonts/inter");
const packageJson = JSON.parse(readFileSync(path.join(root, "package.json"), "utf8")) as {
  dependencies: Record<string, string>;
  devDependencies: Record<string, string>;
};
const shipped = readdirSync(fontsDir).filter((f) => f.endsWith(".ttf"));

describe("shipped fonts", () => {
  it("are the four Inter weights the theme names", () => {
    expect(shipped.sort()).toEqual(["Inter_400Regular.ttf", "Inter_500Medium.ttf", "Inter_600SemiBold.ttf", "Inter_700Bold.ttf"]);
  });

  it.each(shipped)("%s is byte-identical to the file in @expo-google-fonts/inter", (file) => {
    // Inter_400Regular.ttf lives in the package as 400Regular/Inter_400Regular.ttf.
    const weight = file.replace(/^Inter_/, "").replace(/\.ttf$/, "");
    expect(readFileSync(path.join(fontsDir, file)).equals(readFileSync(path.join(packageDir, weight, file)))).toBe(true);
  });

  it("carry the SIL Open Font License, the same text as the package's font licence", () => {
    const licence = readFileSync(path.join(fontsDir, "OFL.txt"), "utf8");
    expect(licence).toContain("SIL OPEN FONT LICENSE Version 1.1");
    expect(licence).toContain("The Inter Project Authors");
    expect(licence).toBe(readFileSync(path.join(packageDir, "LICENSE_FONT"), "utf8"));
  });

  it("come from a pinned dev dependency, not a run-time one", () => {
    expect(packageJson.devDependencies["@expo-google-fonts/inter"]).toBe("0.4.2");
    expect(packageJson.dependencies["@expo-google-fonts/inter"]).toBeUndefined();
    expect((JSON.parse(readFileSync(path.join(packageDir, "package.json"), "utf8")) as { version: string }).version).toBe("0.4.2");
  });
});
