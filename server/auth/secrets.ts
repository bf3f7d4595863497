import { createHash, randomBytes, timingSafeEqual } from "node:crypto";

/** A random secret with a readable prefix, e.g. `pb_…` for API tokens. 32 bytes of entropy. */
export function newSecret(prefix: string): string {
  return `${prefix}${randomBytes(32).toString("base64url")}`;
}

/** Secrets are stored only as their SHA-256; they are long and random, so no salt or stretching is needed. */
export function sha256Hex(value: string): string {
  return createHash("sha256").update(value).digest("hex");
}

export function safeEqual(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}
