/**
 * Pull a filtered CSV from Plotbank with an API token, exactly as a developer would:
 *
 *   PLOTBANK_URL=http://127.0.0.1:8080 PLOTBANK_TOKEN=pb_… node --import tsx tests/developer-pull.ts \
 *     responses "crop=soybean&placement=2x2-band&soilTestClass=low,very_low" [--out responses.csv]
 *
 * The CSV is streamed to stdout (or the file) as it arrives; the row count goes to stderr as `rows: N`.
 */
import { createWriteStream } from "node:fs";
import { Readable, Writable } from "node:stream";
import { pipeline } from "node:stream/promises";

async function main() {
  const base = process.env.PLOTBANK_URL?.replace(/\/$/, "");
  const token = process.env.PLOTBANK_TOKEN;
  if (!base || !token) throw new Error("Set PLOTBANK_URL and PLOTBANK_TOKEN.");
  const args = process.argv.slice(2);
  const outAt = args.indexOf("--out");
  const out = outAt >= 0 ? args.splice(outAt, 2)[1] : undefined;
  const [resource = "responses", query = ""] = args;

  const res = await fetch(`${base}/api/v1/${resource}?${query}`, {
    headers: { Authorization: `Bearer ${token}`, Accept: "text/csv" },
  });
  if (!res.ok || !res.body) {
    const problem = await res.text();
    throw new Error(`Plotbank answered ${res.status}: ${problem}`);
  }

  // Count record ends: newlines outside quoted cells (a doubled quote toggles twice, so it leaves the state alone).
  let lines = 0;
  let quoted = false;
  const counter = new TransformStream<Uint8Array, Uint8Array>({
    transform(chunk, controller) {
      for (const byte of chunk) {
        if (byte === 0x22) quoted = !quoted;
        else if (byte === 0x0a && !quoted) lines++;
      }
      controller.enqueue(chunk);
    },
  });
  const sink = out
    ? createWriteStream(out)
    : new Writable({ write: (chunk, _enc, done) => (process.stdout.write(chunk) ? done() : process.stdout.once("drain", done)) });
  await pipeline(Readable.fromWeb(res.body.pipeThrough(counter) as never), sink);
  // The first record is the header.
  process.stderr.write(`rows: ${Math.max(0, lines - 1)}\n`);
  const described = res.headers.get("link");
  if (described) process.stderr.write(`schema: ${described}\n`);
}

main().catch((error: Error) => {
  process.stderr.write(`${error.message}\n`);
  process.exit(1);
});
