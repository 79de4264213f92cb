import { z } from "zod";

/**
 * Runs in the browser before the app's code (Next's client instrumentation hook). zod probes once
 * whether it may compile object parsers with `Function` (its JIT); under the pages' CSP, which has
 * no 'unsafe-eval' (lib/web/csp.ts), the probe is refused and reported as a violation. Forms parse
 * small objects, so the interpreted parsers lose nothing that shows.
 */
z.config({ jitless: true });
