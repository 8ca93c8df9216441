// Imported first by the web app, before any schema is built. The app runs under a content
// security policy without 'unsafe-eval'; zod's compiled fast path probes for eval with
// `new Function`, which the browser reports as a violation. Parsing without it gives the same results.
import { z } from 'zod';

z.config({ jitless: true });
