// Zod compiles object parsers with `new Function` where eval is allowed, and probes for it when the
// first object schema is made. The Content-Security-Policy allows no eval, so in the browser the
// probe is refused and reported as a policy violation: tell zod not to try. Imported first by
// root.tsx so it runs before any module makes a schema; the server keeps zod's faster parsers.
import { z } from 'zod';

if (typeof document !== 'undefined') z.config({ jitless: true });
