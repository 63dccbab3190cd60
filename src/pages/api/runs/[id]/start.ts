import { route, json, idParam } from '../../../../server/http';
import { startRun, runJson, versionSchema } from '../../../../server/runs';

export const POST = route({ auth: 'runs.operate', body: versionSchema }, async ({ ctx, body, params }) => {
  const run = await startRun(ctx, idParam(params.id), body.version);
  return json({ run: runJson(run) });
});
