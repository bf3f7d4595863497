/**
 * Sign-in for an address without an account must cost what a wrong password costs: one scrypt run at the stored
 * cost. Timing it would be flaky on a shared machine, so this counts the key derivations instead, with a spy on
 * Node's own scrypt that passes every call through.
 */
import type * as crypto from "node:crypto";
import request from "supertest";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";

const scryptCalls = vi.hoisted(() => [] as { N?: number; r?: number; p?: number }[]);
vi.mock("node:crypto", async (importOriginal) => {
  const actual = await importOriginal<typeof crypto>();
  const scrypt = (...args: unknown[]) => {
    scryptCalls.push(args[3] as { N?: number; r?: number; p?: number });
    return (actual.scrypt as (...a: unknown[]) => void)(...args);
  };
  return { ...actual, default: { ...actual, scrypt }, scrypt };
});

let t: TestApp;
beforeAll(async () => {
  t = await testApp({ authLimits: { windowMs: 60_000, perIp: 1000, perAccount: 1000 } });
});
afterAll(() => t.close());
beforeEach(() => {
  scryptCalls.length = 0;
});

describe("sign-in cost does not reveal who has an account", () => {
  it("runs the same scrypt derivation for an unknown address as for a wrong password, and answers the same", async () => {
    const user = await makeUser(t.ctx, "member");
    scryptCalls.length = 0;

    const wrong = await request(t.app).post("/api/v1/session").send({ email: user.email, password: "not-the-password-9" }).expect(401);
    const forWrongPassword = scryptCalls.splice(0);
    const unknown = await request(t.app)
      .post("/api/v1/session")
      .send({ email: "nobody.here@tallgrass.test", password: "not-the-password-9" })
      .expect(401);
    const forUnknownAddress = scryptCalls.splice(0);

    expect(forWrongPassword).toEqual([expect.objectContaining({ N: 2 ** 15, r: 8, p: 1 })]);
    expect(forUnknownAddress).toEqual(forWrongPassword);
    expect(unknown.body.detail).toBe(wrong.body.detail);
  });

  it("still signs in with the right password (the stand-in hash never matches a real one)", async () => {
    const user = await makeUser(t.ctx, "member");
    scryptCalls.length = 0;
    await request(t.app).post("/api/v1/session").send({ email: user.email, password: "field-plots-2026!" }).expect(200);
    expect(scryptCalls).toHaveLength(1);
  });
});
