import { route, json, idParam } from '../../../../server/http';
import { operateSchema, runJson } from '../../../../server/runs';
import { finishRunAsked } from '../../../../server/run-times';

/** Finish a running run now: `{ version, confirm? }`; a finish minutes after the start answers 409 `confirm_required` first. */
export const POST = route({ auth: 'runs.operate', body: operateSchema }, async ({ ctx, body, params }) => {
  const run = await finishRunAsked(ctx, idParam(params.id), body);
  return json({ run: runJson(run) });
});
