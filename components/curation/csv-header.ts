import Papa from "papaparse";
import type { PickedFile } from "@/lib/upload-client";

/** The first 64 KB is plenty for a header line, and keeps a 50 MB file from being read just to map columns. */
const headBytes = 64 * 1024;

async function headText(file: PickedFile): Promise<string> {
  if (file.kind === "web") return file.blob.slice(0, headBytes).text();
  const res = await fetch(file.uri);
  return (await res.text()).slice(0, headBytes);
}

/** The CSV's header cells (comma, semicolon or tab separated, quotes honoured, byte-order mark dropped). */
export async function readCsvHeader(file: PickedFile): Promise<string[]> {
  const text = (await headText(file)).replace(/^\uFEFF/, "");
  const parsed = Papa.parse<string[]>(text, { preview: 1, delimitersToGuess: [",", ";", "\t"] });
  return (parsed.data[0] ?? []).map((h) => h.trim()).filter((h) => h.length > 0);
}
