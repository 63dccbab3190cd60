import { route, json, idParam } from '../../../../server/http';
import { cancelRun, runJson, versionSchema } from '../../../../server/runs';

export const POST = route({ auth: 'runs.book', body: versionSchema }, async ({ ctx, body, params }) => {
  const run = await cancelRun(ctx, idParam(params.id), body.version, body.reason);
  return json({ run: runJson(run) });
});
