import { route, json, idParam, HttpError, afterCommit } from '../../../../server/http';
import { can } from '../../../../server/authz';
import { getRun, onlyMoves, runJson, updateRun, updateRunSchema } from '../../../../server/runs';
import { warningsForRun } from '../../../../server/board';

export const GET = route({ action: 'board.read' }, async ({ ctx, auth, params }) => {
  const ws = ctx.locals.workspace!;
  const run = await getRun(auth.workspaceId, idParam(params.id));
  const warnings = await warningsForRun({ id: auth.workspaceId, timeZone: ws.timeZone, stableDays: ws.stableDays }, run);
  return json({ run: runJson(run), warnings });
});

/**
 * Move or resize (stillId, startsAt, endsAt: managers, planners, distillers) or edit the
 * booking itself (type, status, operator, charge, ferments, feeds, notes: managers and planners).
 */
export const PATCH = route({ action: 'runs.move', body: updateRunSchema }, async ({ ctx, auth, body, params }) => {
  const id = idParam(params.id);
  if (!onlyMoves(body) && !can(auth.role, 'runs.book')) throw new HttpError(403, 'forbidden', 'Your role can move runs but not change their booking.');
  const ws = ctx.locals.workspace!;
  const run = await updateRun(auth.workspaceId, auth.userId, id, body);
  const warnings = await afterCommit(() => warningsForRun({ id: auth.workspaceId, timeZone: ws.timeZone, stableDays: ws.stableDays }, run), null);
  return json({ run: runJson(run), warnings });
});
