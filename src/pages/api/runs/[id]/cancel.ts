import { route, json, idParam } from '../../../../server/http';
import { cancelRun, runJson, versionSchema } from '../../../../server/runs';

export const POST = route({ action: 'runs.book', body: versionSchema }, async ({ auth, body, params }) => {
  const run = await cancelRun(auth.workspaceId, auth.userId, idParam(params.id), body.version, body.reason);
  return json({ run: runJson(run) });
});
