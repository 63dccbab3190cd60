import { route, json, idParam } from '../../../../server/http';
import { operateSchema, runJson } from '../../../../server/runs';
import { startRunAsked } from '../../../../server/run-times';

/** Start a run now: `{ version, confirm? }`; 409 `confirm_required` with `warnings` in words when something needs accepting first. */
export const POST = route({ auth: 'runs.operate', body: operateSchema }, async ({ ctx, body, params }) => {
  const run = await startRunAsked(ctx, idParam(params.id), body);
  return json({ run: runJson(run) });
});
