import { randomBytes, scrypt as scryptCallback } from "node:crypto";
import { promisify } from "node:util";
import { safeEqual } from "./secrets";

const scrypt = promisify(scryptCallback) as (password: string, salt: Buffer, keylen: number, options: object) => Promise<Buffer>;

/** scrypt cost: N = 2^15, r = 8, p = 1 uses 32 MiB per hash, a memory-hard setting (OWASP's scrypt minimum is 2^17 with r=8 over 128 MiB; 2^15 keeps sign-in fast on 2 cores). */
const N = 2 ** 15;
const r = 8;
const p = 1;
const keyLength = 32;
const maxmem = 64 * 1024 * 1024;

export async function hashPassword(password: string): Promise<string> {
  const salt = randomBytes(16);
  const key = await scrypt(password.normalize("NFKC"), salt, keyLength, { N, r, p, maxmem });
  return `scrypt$${N}$${r}$${p}$${salt.toString("base64url")}$${key.toString("base64url")}`;
}

/**
 * Stands in for the hash of an address without an account (or an account without a password): same scheme and cost
 * as a real hash, and no password derives an all-zero key. Verifying against it makes an unknown address cost the
 * same scrypt run as a wrong password, so the time a sign-in takes does not tell which addresses have accounts.
 */
const noAccountHash = `scrypt$${N}$${r}$${p}$${"A".repeat(22)}$${"A".repeat(43)}`;

export async function verifyPassword(password: string, stored: string | null | undefined): Promise<boolean> {
  const matches = await matchesHash(password, stored ?? noAccountHash);
  return !!stored && matches;
}

async function matchesHash(password: string, stored: string): Promise<boolean> {
  const [scheme, n, rr, pp, salt, hash] = stored.split("$");
  if (scheme !== "scrypt" || !n || !rr || !pp || !salt || !hash) return false;
  const key = await scrypt(password.normalize("NFKC"), Buffer.from(salt, "base64url"), keyLength, {
    N: Number(n),
    r: Number(rr),
    p: Number(pp),
    maxmem,
  });
  return safeEqual(key.toString("base64url"), hash);
}
