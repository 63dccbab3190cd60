/**
 * Faults, short run for `npm test` (about 40 s): MariaDB stopped for 2 s under write load,
 * the importer killed mid-transaction, SMTP down then back, two planners racing on one run.
 * The long run is tests/soak/faults.soak.test.ts in `npm run test:soak`. See tests/helpers/faults-suite.ts.
 */
import { faultSuite } from '../helpers/faults-suite';

faultSuite({ label: 'short', loadSeconds: 5, downSeconds: 2, writers: 6, outages: 1, importRows: 2000, killAttempts: 2, raceRounds: 5 });
