import { spawn } from "node:child_process";

/** `npm run dev`: the Expo dev server (web, port 8081) and the API (port 8080, proxying the app) together. */
const metroPort = process.env.METRO_PORT ?? "8081";
const env = { ...process.env, EXPO_OFFLINE: "1", EXPO_NO_TELEMETRY: "1", EXPO_UNSTABLE_HEADLESS: "1", BROWSER: "none" };
const expo = spawn("npx", ["expo", "start", "--web", "--port", metroPort], { stdio: "inherit", env });
const api = spawn(process.execPath, ["--import", "tsx", "server/main.ts"], {
  stdio: "inherit",
  env: { ...env, PLOTBANK_WEB_PROXY: `http://127.0.0.1:${metroPort}` },
});
const stop = () => {
  expo.kill("SIGTERM");
  api.kill("SIGTERM");
};
process.on("SIGINT", stop);
process.on("SIGTERM", stop);
api.on("exit", (code) => {
  expo.kill("SIGTERM");
  process.exit(code ?? 0);
});
