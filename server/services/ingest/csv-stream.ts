import { createHash } from "node:crypto";
import { Readable, Transform } from "node:stream";
import { StringDecoder } from "node:string_decoder";
import Papa from "papaparse";
import { HttpProblem } from "@/server/errors";

export interface CsvReadResult {
  sha256: string;
  byteSize: number;
  /** The raw bytes as received, in their original chunks (never joined into one string). */
  chunks: Buffer[];
  delimiter: string;
  /** Data rows read, header excluded. */
  rows: number;
  header: string[];
}

const utf16le = Buffer.from([0xff, 0xfe]);
const utf16be = Buffer.from([0xfe, 0xff]);

/** The file is not UTF-8 text; say where and what to do, rather than storing text the database cannot hold. */
function notUtf8(byteOffset: number, why: string): HttpProblem {
  return new HttpProblem(
    400,
    "Bad request",
    `The file is not UTF-8 text: ${why}, near byte ${byteOffset}. Save it as "CSV UTF-8" and upload it again.`,
    {
      errors: [{ field: "file", message: `not UTF-8 text near byte ${byteOffset}` }],
    },
  );
}

/** The file is over the upload limit: answered as 413 naming the limit. */
export function tooLarge(limitBytes: number): HttpProblem {
  const mb = (limitBytes / 1024 / 1024).toFixed(limitBytes < 1024 * 1024 ? 3 : 0);
  return new HttpProblem(413, "Content too large", `The file is larger than the upload limit of ${limitBytes} bytes (${mb} MB).`, {
    limit: limitBytes,
  });
}

/**
 * Reads a CSV upload as a stream: hashes and counts the raw bytes, refuses more than `limitBytes`, decodes UTF-8
 * across chunk boundaries, drops a byte-order mark, detects the delimiter (comma, semicolon or tab) and hands each
 * record to `onRow` as it is parsed. Quoted fields may contain delimiters and newlines.
 * `onRow` gets the header first (index 0), then data rows numbered from 1.
 */
export async function readCsvStream(
  source: Readable,
  limitBytes: number,
  onRow: (fields: string[], index: number, delimiter: string) => void,
): Promise<CsvReadResult> {
  const hash = createHash("sha256");
  const chunks: Buffer[] = [];
  let byteSize = 0;
  let overLimit = false;
  const decoder = new StringDecoder("utf8");
  let first = true;
  const text = new Transform({
    readableObjectMode: true,
    transform(chunk: Buffer, _enc, done) {
      if (overLimit) return done();
      byteSize += chunk.length;
      if (byteSize > limitBytes) {
        overLimit = true;
        return done(tooLarge(limitBytes));
      }
      const nul = chunk.indexOf(0);
      if (nul >= 0 || (byteSize === chunk.length && (chunk.subarray(0, 2).equals(utf16le) || chunk.subarray(0, 2).equals(utf16be)))) {
        return done(notUtf8(byteSize - chunk.length + Math.max(nul, 0), "it holds NUL bytes or a UTF-16 byte-order mark"));
      }
      hash.update(chunk);
      chunks.push(chunk);
      let s = decoder.write(chunk);
      const bad = s.indexOf("\uFFFD");
      if (bad >= 0)
        return done(notUtf8(byteSize - chunk.length, "it has bytes that are not valid UTF-8 (Latin-1 or Windows-1252, perhaps)"));
      if (first && s.length > 0) {
        first = false;
        if (s.charCodeAt(0) === 0xfeff) s = s.slice(1);
      }
      done(null, s.length ? s : undefined);
    },
    flush(done) {
      const rest = decoder.end();
      done(null, rest.length ? rest : undefined);
    },
  });

  let index = 0;
  let header: string[] = [];
  let delimiter = ",";
  let parseError: HttpProblem | undefined;
  await new Promise<void>((resolve, reject) => {
    // A source that failed before reading began (a multipart body cut off while the draft was loading) fires no
    // second error event: look at its state, or the read would wait forever.
    if (source.errored) return reject(source.errored);
    source.on("error", reject);
    text.on("error", reject);
    source.pipe(text);
    Papa.parse<string[]>(text as unknown as File, {
      delimiter: "",
      delimitersToGuess: [",", ";", "\t"],
      skipEmptyLines: true,
      step(results, parser) {
        if (parseError) return;
        if (index === 0) delimiter = results.meta.delimiter || ",";
        const quoteError = results.errors.find((e) => e.code === "MissingQuotes" || e.code === "InvalidQuotes");
        if (quoteError) {
          parseError = new HttpProblem(400, "Bad request", `The CSV is malformed near data row ${index}: ${quoteError.message}.`, {
            errors: [{ row: index, message: quoteError.message }],
          });
          parser.abort();
          return;
        }
        try {
          if (index === 0) header = results.data;
          onRow(results.data, index, delimiter);
        } catch (error) {
          parseError = error instanceof HttpProblem ? error : new HttpProblem(500, "Internal server error", String(error));
          parser.abort();
          return;
        }
        index += 1;
      },
      complete: () => resolve(),
      error: (error: Error) => reject(error),
    });
  });
  if (parseError) {
    // Drain what is left so the client's request finishes before we answer.
    source.resume();
    throw parseError;
  }
  if (index === 0) {
    throw new HttpProblem(400, "Bad request", byteSize === 0 ? "The file is empty." : "The file has no header row.", {
      errors: [{ row: 0, message: byteSize === 0 ? "empty file: expected a header row and at least one data row" : "no header row" }],
    });
  }
  return { sha256: hash.digest("hex"), byteSize, chunks, delimiter, rows: index - 1, header };
}

/** A text body (tests, the demo seed) as a stream of one chunk per 64 KiB. */
export function textStream(text: string | Buffer): Readable {
  const buffer = typeof text === "string" ? Buffer.from(text, "utf8") : text;
  const parts: Buffer[] = [];
  for (let i = 0; i < buffer.length; i += 65536) parts.push(buffer.subarray(i, i + 65536));
  return Readable.from(parts, { objectMode: false });
}
