// Runs in the browser before the app hydrates (Next's instrumentation-client file).
// zod 4 probes `new Function("")` once, on its first parse, to decide whether to compile fast
// parsers. Our Content Security Policy has no 'unsafe-eval' (proxy.ts), so the browser reports
// that probe as a violation even though zod catches the error; jitless mode skips the probe.
// The browser's parses are small (API answers, form values) and do not need the compiled path.
import { z } from "zod";

z.config({ jitless: true });
