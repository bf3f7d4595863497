import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { health } from "@/schemas/dataset";

// `npm start`'s entry point as its own process, as a server runs it: the printed address, the on-disk database
// surviving a restart, and a clean stop on SIGTERM. It serves the web export, so it lives beside the browser tests.
const root = path.resolve(__dirname, "../..");
const packageVersion = (JSON.parse(readFileSync(path.join(root, "package.json"), "utf8")) as { version: string }).version;

interface MainProcess {
  url: string;
  child: ChildProcess;
  output(): string;
  /** Send a signal and wait for the exit: the code and the signal, as `exit` reports them. */
  stop(signal?: NodeJS.Signals): Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
}

/** Starts server/main.ts directly, or (`command: "npm start"`) through npm as the README's run command does. */
async function startMain(env: Record<string, string>, command: "node" | "npm start" = "node"): Promise<MainProcess> {
  const { DATABASE_URL: _url, PLOTBANK_WEB_PROXY: _proxy, ...inherited } = process.env;
  const [file, args] = command === "node" ? [process.execPath, ["--import", "tsx", "server/main.ts"]] : ["npm", ["start"]];
  const child = spawn(file, args, {
    cwd: root,
    env: {
      ...inherited,
      HOST: "127.0.0.1",
      PORT: "0",
      NODE_ENV: "production",
      PLOTBANK_MAIL_OUTBOX_ONLY: "1",
      PLOTBANK_DEMO: "off",
      ...env,
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let log = "";
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) =>
    child.once("exit", (code, signal) => resolve({ code, signal })),
  );
  const url = await new Promise<string>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`no "is serving" line within 60 s:\n${log}`)), 60_000);
    const read = (chunk: Buffer) => {
      log += chunk.toString();
      const found = /is serving (http:\/\/\S+?)[\s,;)]/.exec(log);
      if (found) {
        clearTimeout(timer);
        resolve(found[1]!);
      }
    };
    child.stdout!.on("data", read);
    child.stderr!.on("data", read);
    void exited.then(({ code, signal }) => {
      clearTimeout(timer);
      reject(new Error(`exited early (${code ?? signal}):\n${log}`));
    });
  });
  return {
    url,
    child,
    output: () => log,
    async stop(signal: NodeJS.Signals = "SIGTERM") {
      if (child.exitCode === null && child.signalCode === null) child.kill(signal);
      return exited;
    },
  };
}

const email = "field-tech@plotbank.test";
const password = "loam-furrow-7391-basin";

/** Sign-in tells an unconfirmed account apart from an unknown one; that is how the test sees the account exists. */
async function signInDetail(url: string) {
  const res = await fetch(`${url}/api/v1/session`, {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify({ email, password }),
  });
  expect(res.status).toBe(401);
  return ((await res.json()) as { detail: string }).detail;
}

let work: string;
let running: MainProcess | undefined;
/** Processes started under npm, killed too should the test fail before npm stops them. */
const underNpm: number[] = [];

function childProcesses(pid: number): { pid: number; name: string }[] {
  let listing = "";
  try {
    listing = execFileSync("ps", ["-o", "pid=,comm=", "--ppid", String(pid)], { encoding: "utf8" });
  } catch {
    return []; // ps exits 1 when there are none
  }
  return listing
    .trim()
    .split("\n")
    .map((line) => line.trim().split(/\s+/))
    .map(([child, name]) => ({ pid: Number(child), name: name ?? "" }));
}
beforeAll(() => {
  work = mkdtempSync(path.join(tmpdir(), "plotbank-main-"));
});
afterAll(async () => {
  await running?.stop("SIGKILL");
  for (const pid of underNpm) {
    try {
      process.kill(pid, "SIGKILL");
    } catch {
      // already gone, as it should be
    }
  }
  rmSync(work, { recursive: true, force: true });
});

describe("the production process (server/main.ts)", () => {
  it("prints its address, keeps its data across a SIGTERM restart, and exits 0 on SIGTERM", async () => {
    const env = { PLOTBANK_DATA_DIR: path.join(work, "pglite") };
    running = await startMain(env);
    const first = running;
    expect(first.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+$/);
    expect(first.url).not.toMatch(/:0$/);

    const answer = await fetch(`${first.url}/api/v1/health`);
    expect(answer.status).toBe(200);
    expect(health.parse(await answer.json())).toMatchObject({
      status: "ok",
      version: packageVersion,
      database: { kind: "pglite", connected: true },
    });
    expect(await signInDetail(first.url)).toMatch(/e-mail or the password is wrong/);
    const signUp = await fetch(`${first.url}/api/v1/sign-up`, {
      method: "POST",
      headers: { "Content-Type": "application/json" },
      body: JSON.stringify({ email, displayName: "Field Technician", password }),
    });
    expect(signUp.status).toBe(202);
    expect(await signInDetail(first.url)).toMatch(/Confirm your e-mail address/);
    // An idle keep-alive connection must not hold the stop up.
    await fetch(`${first.url}/api/v1/health`, { headers: { Connection: "keep-alive" } });
    expect(await first.stop("SIGTERM")).toEqual({ code: 0, signal: null });

    running = await startMain(env);
    const second = running;
    expect(health.parse(await (await fetch(`${second.url}/api/v1/health`)).json()).database).toMatchObject({
      kind: "pglite",
      connected: true,
    });
    expect(await signInDetail(second.url)).toMatch(/Confirm your e-mail address/);
    // The web export is served by the same process.
    const page = await fetch(`${second.url}/datasets`);
    expect(page.headers.get("content-type")).toMatch(/^text\/html/);
    expect(await second.stop("SIGTERM")).toEqual({ code: 0, signal: null });
    running = undefined;
  }, 120_000);

  it("stops when SIGTERM is sent to the npm start process itself: npm's shell execs the server, which closes and exits 0", async () => {
    running = await startMain({ PLOTBANK_DATA_DIR: path.join(work, "npm-start") }, "npm start");
    const npm = running;
    expect((await fetch(`${npm.url}/api/v1/health`)).status).toBe(200);
    // npm runs the script with `sh -c`; with `exec` the shell becomes the server, so npm's only child is node itself.
    const children = childProcesses(npm.child.pid!);
    underNpm.push(...children.flatMap((child) => [child.pid, ...childProcesses(child.pid).map((grandchild) => grandchild.pid)]));
    expect(children.map((child) => child.name)).toEqual(["node"]);
    const serverPid = children[0]!.pid;

    expect(await npm.stop("SIGTERM")).toEqual({ code: 0, signal: null });
    expect(npm.output()).toContain("SIGTERM: taking no new requests or jobs, finishing those in flight, then closing the database");
    // Nothing is left listening: the port refuses, and the server's process is gone.
    await expect(fetch(`${npm.url}/api/v1/health`)).rejects.toThrow();
    expect(() => process.kill(serverPid, 0)).toThrow(/ESRCH/);
    running = undefined;
  }, 120_000);
});
