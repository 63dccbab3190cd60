import { route, json, afterCommit } from '../../../server/http';
import { createRun, createRunSchema, runJson } from '../../../server/runs';
import { warningsForRun } from '../../../server/board';

/** Book a run (managers and planners). */
export const POST = route({ action: 'runs.book', body: createRunSchema }, async ({ ctx, auth, body }) => {
  const ws = ctx.locals.workspace!;
  const run = await createRun(auth.workspaceId, auth.userId, body);
  const warnings = await afterCommit(() => warningsForRun({ id: auth.workspaceId, timeZone: ws.timeZone, stableDays: ws.stableDays }, run), null);
  return json({ run: runJson(run), warnings }, 201);
});
