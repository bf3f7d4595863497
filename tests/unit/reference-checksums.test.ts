import { createHash } from "node:crypto";
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { referenceDirectory } from "@/tests/stats/fixtures";

// The published reference values the statistics tests compare against (tests/fixtures/reference/README.md names the
// source of each). SHA256SUMS is the record of what was computed; a file that changes, disappears or appears without
// a checksum fails here, before any statistics test can pass against altered numbers.
const notData = new Set(["README.md", "SHA256SUMS"]);

function filesUnder(directory: string, prefix = ""): string[] {
  return readdirSync(directory, { withFileTypes: true }).flatMap((entry) =>
    entry.isDirectory() ? filesUnder(path.join(directory, entry.name), `${prefix}${entry.name}/`) : [`${prefix}${entry.name}`],
  );
}

const listed = readFileSync(path.join(referenceDirectory, "SHA256SUMS"), "utf8")
  .split("\n")
  .filter((line) => line.trim() !== "")
  .map((line, index) => {
    const match = /^([0-9a-f]{64}) {2}(\S+)$/.exec(line);
    if (!match) throw new Error(`SHA256SUMS line ${index + 1} is not "<sha256>  <file>": ${line}`);
    return { sha256: match[1]!, file: match[2]! };
  });

describe("reference fixtures", () => {
  it("every data file in the folder has a checksum, and every checksum has its file", () => {
    const present = filesUnder(referenceDirectory)
      .filter((file) => !notData.has(file))
      .sort();
    expect(listed.map((entry) => entry.file).sort()).toEqual(present);
    expect(present.length).toBeGreaterThanOrEqual(22);
  });

  it.each(listed)("$file matches its SHA-256", ({ file, sha256 }) => {
    expect(
      createHash("sha256")
        .update(readFileSync(path.join(referenceDirectory, file)))
        .digest("hex"),
    ).toBe(sha256);
  });

  it("each results file names its source and the program versions that computed it", () => {
    for (const { file } of listed.filter((entry) => entry.file.endsWith("_results.json"))) {
      const results = JSON.parse(readFileSync(path.join(referenceDirectory, file), "utf8")) as {
        source?: string;
        computed_with?: Record<string, string>;
      };
      expect(results.source, file).toMatch(/\(\d{4}\)/);
      expect(results.computed_with?.metafor ?? results.computed_with?.R, file).toBeTruthy();
    }
  });
});
