/** Hostile input, long run for `npm run test:soak`: 200 generated requests per API route and method. */
import { fuzzSuite } from '../helpers/fuzz-suite';

fuzzSuite({ numRuns: Number(process.env.FUZZ_RUNS ?? 200), label: 'soak' });
