import { z } from "zod";
// Installs the readable wording of zod issues wherever a request schema is loaded, in the server and in the app.
import "@/schemas/messages";

/**
 * Text the contract accepts. PostgreSQL cannot store U+0000 in text (it fails the whole statement), a line break in a
 * one-line field forges records in line-based formats such as RIS, and other control characters are invisible in
 * every screen that shows them. So every string a request carries refuses them at the edge, with a 400 naming the
 * field, before anything reaches the database or a file.
 */

/** C0 controls (U+0000–U+001F), DEL and the C1 controls, plus the Unicode line and paragraph separators. */
// eslint-disable-next-line no-control-regex -- matching control characters is the point
const controlInLine = /[\u0000-\u001f\u007f-\u009f\u2028\u2029]/;
/** The same, except tab, line feed and carriage return, which a paragraph may hold. */
// eslint-disable-next-line no-control-regex -- matching control characters is the point
const controlInBlock = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f]/;

const codePoint = (c: string) => `U+${c.codePointAt(0)!.toString(16).toUpperCase().padStart(4, "0")}`;

function refuse(pattern: RegExp, allowed: string) {
  return (value: string, ctx: z.core.$RefinementCtx<string>) => {
    const found = pattern.exec(value);
    if (found) {
      ctx.addIssue({
        code: "custom",
        message: `contains the control character ${codePoint(found[0])} at position ${found.index + 1}; ${allowed}`,
        input: value,
      });
    }
  };
}

const lineCheck = refuse(controlInLine, "this field is one line of text: no line breaks, tabs or other control characters");
const blockCheck = refuse(controlInBlock, "only tab, line feed and carriage return are allowed");

/** The one test both schemas apply, for callers that check text outside a schema (path parameters, CSV cells). */
export const hasControlCharacter = (value: string, multiline = false) => (multiline ? controlInBlock : controlInLine).test(value);

/** A one-line string: titles, names, codes, slugs, query parameters. */
export const line = () => z.string().check(z.superRefine(lineCheck));

/** A string that may hold paragraphs: descriptions, methods, changelogs, comments. */
export const paragraph = () => z.string().check(z.superRefine(blockCheck));
