import { route, json, idParam } from '../../../../server/http';
import { startRun, runJson, versionSchema } from '../../../../server/runs';

export const POST = route({ action: 'runs.operate', body: versionSchema }, async ({ auth, body, params }) => {
  const run = await startRun(auth.workspaceId, auth.userId, idParam(params.id), body.version);
  return json({ run: runJson(run) });
});
