import { spawn, type ChildProcess } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";

export interface ServerProcess {
  url: string;
  pid: number;
  child: ChildProcess;
  dataDir: string;
  rssMb(): number;
  stop(signal?: NodeJS.Signals): Promise<void>;
  output(): string;
}

/** Start `npm start`'s entry point as its own process on a loopback port, with its own PGlite folder. */
export async function startServerProcess(options: {
  port: number;
  env?: Record<string, string>;
  dataDir?: string;
  keepData?: boolean;
}): Promise<ServerProcess> {
  const dataDir = options.dataDir ?? mkdtempSync(path.join(tmpdir(), "plotbank-bench-"));
  let log = "";
  // Benchmarks send no mail to anyone: production settings, with mail kept in the outbox.
  const child = spawn(process.execPath, ["--import", "tsx", "server/main.ts"], {
    cwd: path.resolve(__dirname, ".."),
    env: {
      ...process.env,
      PORT: String(options.port),
      HOST: "127.0.0.1",
      PLOTBANK_DATA_DIR: dataDir,
      NODE_ENV: "production",
      PLOTBANK_MAIL_OUTBOX_ONLY: "1",
      ...options.env,
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout!.on("data", (d) => (log += d));
  child.stderr!.on("data", (d) => (log += d));
  const url = `http://127.0.0.1:${options.port}`;
  const deadline = Date.now() + 180_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`server exited early:\n${log}`);
    try {
      const res = await fetch(`${url}/api/v1/health`);
      if (res.ok && log.includes("is serving")) break;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`server did not start in time:\n${log}`);
    await new Promise((r) => setTimeout(r, 250));
  }
  return {
    url,
    pid: child.pid!,
    child,
    dataDir,
    rssMb: () => rssOf(child.pid!),
    output: () => log,
    async stop(signal: NodeJS.Signals = "SIGTERM") {
      if (child.exitCode === null) {
        const exited = new Promise((r) => child.once("exit", r));
        child.kill(signal);
        await exited;
      }
      if (!options.keepData) rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

export function rssOf(pid: number): number {
  const status = readFileSync(`/proc/${pid}/status`, "utf8");
  const kb = Number(/VmRSS:\s+(\d+)/.exec(status)?.[1] ?? 0);
  return Math.round((kb / 1024) * 10) / 10;
}
