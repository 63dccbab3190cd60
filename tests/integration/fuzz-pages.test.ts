/**
 * Hostile input at every page, short run for `npm test`: generated GET requests per page (hostile
 * [param] values, query strings, Accept/Accept-Language/cookies; as A's manager, a member of B
 * and with no session) and POSTs to page paths. See tests/helpers/fuzz-pages-suite.ts.
 * The long run is tests/soak/fuzz-pages.soak.test.ts in `npm run test:soak`.
 */
import { fuzzPagesSuite } from '../helpers/fuzz-pages-suite';

fuzzPagesSuite({ numRuns: Number(process.env.FUZZ_PAGE_RUNS ?? 20), numPostRuns: Number(process.env.FUZZ_PAGE_POST_RUNS ?? 4), label: 'pages-short' });
