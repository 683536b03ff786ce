/**
 * Imported first by src/main.tsx, before any schema is built. zod 4 compiles object
 * parsers with `new Function` unless told not to; under Tideline's Content-Security-Policy
 * (no 'unsafe-eval', server/middleware/hardening.ts) that is refused, and even zod's own
 * probe for it is reported as a CSP violation. `jitless` makes zod skip both (zod's
 * documented switch for CSP environments); parsing stays correct, only without the JIT.
 */
import { z } from "zod";

z.config({ jitless: true });
