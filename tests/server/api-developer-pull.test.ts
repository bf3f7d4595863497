import { execFile } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import type { Server } from "node:http";
import type { AddressInfo } from "node:net";
import os from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createdToken } from "@/schemas/tokens";
import { insertPublicFixture, isLatestPublished, modelCells } from "@/tests/support/public-fixture";
import { signedInAgent } from "@/tests/support/sign-in";
import { makeUser, testApp, type TestApp } from "@/tests/support/test-app";

const run = promisify(execFile);

/** The developer's script against a real server on a loopback port, with a token made over HTTP. */
let t: TestApp;
let server: Server;
let url: string;
let secret: string;
let dir: string;
beforeAll(async () => {
  t = await testApp();
  await insertPublicFixture(t.ctx);
  server = await new Promise<Server>((resolve) => {
    const s = t.app.listen(0, "127.0.0.1", () => resolve(s));
  });
  url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const user = await makeUser(t.ctx, "member");
  const agent = await signedInAgent(t.app, user.email);
  secret = createdToken.parse((await agent.post("/api/v1/tokens").send({ name: "developer pull" }).expect(201)).body).secret;
  dir = mkdtempSync(path.join(os.tmpdir(), "plotbank-pull-"));
});
afterAll(async () => {
  await new Promise((resolve) => server.close(resolve));
  rmSync(dir, { recursive: true, force: true });
  await t.close();
});

const script = path.resolve(__dirname, "../developer-pull.ts");
const pull = (args: string[], token = secret) =>
  run(process.execPath, ["--import", "tsx", script, ...args], {
    env: { ...process.env, PLOTBANK_URL: url, PLOTBANK_TOKEN: token },
    cwd: path.resolve(__dirname, "../.."),
  });

describe("tests/developer-pull.ts", () => {
  it("pulls a filtered CSV of responses with a token, to a file, and counts its rows", async () => {
    const out = path.join(dir, "responses.csv");
    const { stderr } = await pull(["responses", "crop=soybean&placement=2x2-band,in-furrow", "--out", out]);
    const want = modelCells(isLatestPublished).filter(
      (c) => c.crop === "soybean" && c.placements.some((p) => ["2x2-band", "in-furrow"].includes(p)),
    ).length;
    expect(stderr).toContain(`rows: ${want}`);
    expect(stderr).toContain('rel="describedby"');
    const file = readFileSync(out, "utf8");
    const same = await request(t.app).get("/api/v1/responses?crop=soybean&placement=2x2-band,in-furrow&format=csv").expect(200);
    expect(file).toBe(same.text);
  });
  it("streams to stdout when no file is named", async () => {
    const { stdout, stderr } = await pull(["observations", "crop=corn&units=kg/ha"]);
    expect(stdout.split("\r\n")[0]).toMatch(/^id,dataset,version,/);
    expect(stderr).toContain(`rows: ${modelCells(isLatestPublished).filter((c) => c.crop === "corn").length * 4}`);
  });
  it("fails clearly with a revoked or unknown token", async () => {
    await expect(pull(["responses", ""], "pb_not-a-real-token")).rejects.toMatchObject({ stderr: expect.stringContaining("401") });
  });
});
