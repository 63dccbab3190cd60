/** Hostile input at every page, long run for `npm run test:soak`: 200 generated GETs and 40 POSTs per page. */
import { fuzzPagesSuite } from '../helpers/fuzz-pages-suite';

fuzzPagesSuite({ numRuns: Number(process.env.FUZZ_PAGE_RUNS ?? 200), numPostRuns: Number(process.env.FUZZ_PAGE_POST_RUNS ?? 40), label: 'pages-soak' });
