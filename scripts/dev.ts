import { spawn, type ChildProcess } from "node:child_process";

/**
 * `npm run dev`: the Expo dev server (web, port 8081) and the API (port 8080, proxying the app) together. The two
 * live and die together: when either exits the other is stopped, and Ctrl-C or SIGTERM stops both before this exits.
 */
const metroPort = process.env.METRO_PORT ?? "8081";
const env = { ...process.env, EXPO_OFFLINE: "1", EXPO_NO_TELEMETRY: "1", EXPO_UNSTABLE_HEADLESS: "1", BROWSER: "none" };

interface Child {
  name: string;
  process: ChildProcess;
  exited: Promise<void>;
}

function start(name: string, args: string[], childEnv: NodeJS.ProcessEnv): Child {
  // Started with node itself rather than through npx, so the process we signal is the server and not a wrapper.
  const child = spawn(process.execPath, args, { stdio: "inherit", env: childEnv });
  const exited = new Promise<void>((resolve) => {
    child.once("exit", (code, signal) => {
      if (!stopping) {
        console.error(`\n${name} stopped (${signal ?? `exit code ${code}`}); stopping the rest.`);
        stopAll(code || 1);
      }
      resolve();
    });
    child.once("error", (error) => {
      console.error(`${name} could not start: ${error.message}`);
      if (!stopping) stopAll(1);
      resolve();
    });
  });
  return { name, process: child, exited };
}

const running = (c: Child) => c.process.exitCode === null && c.process.signalCode === null && c.process.pid !== undefined;

let stopping = false;
function stopAll(code: number) {
  if (stopping) return;
  stopping = true;
  for (const c of children) if (running(c)) c.process.kill("SIGTERM");
  // A child that ignores SIGTERM (a stuck bundler) is killed after a grace period, so `npm run dev` always ends.
  const force = setTimeout(() => {
    for (const c of children) if (running(c)) c.process.kill("SIGKILL");
  }, 10_000);
  void Promise.all(children.map((c) => c.exited)).then(() => {
    clearTimeout(force);
    process.exit(code);
  });
}

const children: Child[] = [
  start("The Expo dev server", [require.resolve("expo/bin/cli"), "start", "--web", "--port", metroPort], env),
  start("The API", ["--import", "tsx", "server/main.ts"], { ...env, PLOTBANK_WEB_PROXY: `http://127.0.0.1:${metroPort}` }),
];
process.on("SIGINT", () => stopAll(0));
process.on("SIGTERM", () => stopAll(0));
