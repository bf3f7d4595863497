import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import path from "node:path";

/** Browser tests run against the real web export; build it once when it is missing. */
export default function setup() {
  const dist = path.resolve(__dirname, "../../dist/index.html");
  if (existsSync(dist) && !process.env.PLOTBANK_REBUILD_WEB) return;
  const build = spawnSync("npm", ["run", "build:web"], { stdio: "inherit", cwd: path.resolve(__dirname, "../..") });
  if (build.status !== 0) throw new Error("web build failed");
}
