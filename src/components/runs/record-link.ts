/** Where a finished run's record lives, and the words of the link to it (the board, the day view, the run page and the run sheet say the same). */
import { FRACTIONS_BY_RUN_TYPE } from '../../lib/reports';
import type { RunType } from '../../lib/vocabulary';

export const runRecordHref = (runId: number) => `/runs/${runId}/record`;

/** Cleaning and maintenance slots have nothing to record off the still. */
export const takesRecord = (type: RunType) => FRACTIONS_BY_RUN_TYPE[type].length > 0;

/** A run with a record shows it; a done run without one asks for it. */
export const runRecordLinkText = (recorded: boolean) => (recorded ? 'Run record' : 'Record what came off');
