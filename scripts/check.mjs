// `npm run check`: the static checks `npm test` starts with — types, ESLint, Prettier's check.
import { runChecks } from './lib/services.mjs';

process.exit(runChecks() ? 0 : 1);
