import { route, json, idParam } from '../../../../server/http';
import { actualTimesSchema, correctActualTimes, runJson } from '../../../../server/runs';

/** Correct when a run really started or finished (managers and planners), with a reason kept in the audit log. */
export const PATCH = route({ auth: 'runs.correct_times', body: actualTimesSchema }, async ({ ctx, body, params }) => {
  const run = await correctActualTimes(ctx, idParam(params.id), body);
  return json({ run: runJson(run) });
});
