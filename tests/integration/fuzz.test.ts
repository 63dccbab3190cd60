/**
 * Hostile input, short run for `npm test`: 15 generated requests per API route and method
 * (malformed and extreme bodies, query strings, ids and headers; see tests/helpers/fuzz.ts).
 * The long run (200 per route) is tests/soak/fuzz.soak.test.ts in `npm run test:soak`.
 */
import { fuzzSuite } from '../helpers/fuzz-suite';

fuzzSuite({ numRuns: Number(process.env.FUZZ_RUNS ?? 15), label: 'short' });
