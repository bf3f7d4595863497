import { ZxcvbnFactory, type ZxcvbnResult } from "@zxcvbn-ts/core";
import * as common from "@zxcvbn-ts/language-common";
import * as english from "@zxcvbn-ts/language-en";

const minimumPasswordLength = 12;
/**
 * zxcvbn's scale runs 0–4; 3 means at least about 10^8 guesses, "modest protection from offline attacks: safely
 * unguessable, assuming a salted, slow hash function like ... scrypt" (zxcvbn-ts core, src/TimeEstimates.ts, guessesToScore).
 */
const minimumPasswordScore = 3;

let estimator: ZxcvbnFactory | undefined;

/**
 * zxcvbn-ts with its common-password and diceware lists, the English word, name and Wikipedia lists, and English
 * feedback. Built on first use: loading the dictionaries takes a quarter of a second, which only sign-up and password
 * changes should pay. Server only: the dictionaries are megabytes the web bundle must not carry.
 */
function strengthEstimator(): ZxcvbnFactory {
  estimator ??= new ZxcvbnFactory({
    dictionary: { ...common.dictionary, ...english.dictionary },
    graphs: common.adjacencyGraphs,
    translations: english.translations,
  });
  return estimator;
}

/** The whole password is one entry of the common-password list (also reversed or with l33t substitutions). */
const isCommonPassword = (result: ZxcvbnResult) =>
  result.sequence.some(
    (m) => m.pattern === "dictionary" && m.dictionaryName === "passwords-common" && m.token.length === result.password.length,
  );

/** Why a password is refused, or null when it is acceptable. The message is zxcvbn's own feedback where it has one. */
export function passwordWeakness(password: string, email?: string): string | null {
  if (password.length < minimumPasswordLength) return `Use at least ${minimumPasswordLength} characters.`;
  if (password.length > 256) return "Use at most 256 characters.";
  const localPart = email?.toLowerCase().split("@")[0];
  if (localPart && password.toLowerCase().includes(localPart)) return "Do not build the password from your e-mail address.";
  const result = strengthEstimator().check(password, email ? [email, ...email.split(/[@.]/)] : []);
  if (!isCommonPassword(result) && result.score >= minimumPasswordScore) return null;
  const feedback = [result.feedback.warning, ...result.feedback.suggestions].filter(Boolean).join(" ");
  return feedback || "This password is too easy to guess. Add another uncommon word or two.";
}
