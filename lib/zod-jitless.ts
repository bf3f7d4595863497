import { z } from "zod";

/**
 * zod builds its fast object parsers with `new Function`, and probes for that once when the first object schema is
 * made. Under the server's Content-Security-Policy (no 'unsafe-eval') the probe is refused, and the browser reports
 * a CSP violation even though zod catches it. Jitless mode skips the probe and parses without generated code. It
 * must run before any schema module is evaluated, so the app's entry file imports this first.
 */
z.config({ jitless: true });
