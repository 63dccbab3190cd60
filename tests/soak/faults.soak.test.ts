/** Faults, long run for `npm run test:soak`: three outages of 5 s under 60 s of load, eight kills of a 20,000-row import, fifty races. */
import { faultSuite } from '../helpers/faults-suite';

faultSuite({ label: 'soak', loadSeconds: 60, downSeconds: 5, writers: 16, outages: 3, importRows: 20000, killAttempts: 8, raceRounds: 50 });
