import { afterEach } from "vitest";
import { takeAnswerMismatches } from "./answer-check";

/** Fails the test during which an API answer did not match the OpenAPI document (see answer-check.ts). */
afterEach(() => {
  const found = takeAnswerMismatches();
  if (found.length) {
    throw new Error(`${found.length} API answer(s) do not match the OpenAPI document:\n${[...new Set(found)].slice(0, 20).join("\n")}`);
  }
});
