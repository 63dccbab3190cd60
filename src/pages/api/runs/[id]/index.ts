import { route, json, idParam, HttpError, afterCommit } from '../../../../server/http';
import { can } from '../../../../server/authz';
import { getRun, onlyMoves, runJson, updateRun, updateRunSchema } from '../../../../server/runs';
import { warningsForRun } from '../../../../server/board';

export const GET = route({ auth: 'board.read' }, async ({ ctx, params }) => {
  const run = await getRun(ctx, idParam(params.id));
  const warnings = await warningsForRun(ctx, run);
  return json({ run: runJson(run), warnings });
});

/**
 * Move or resize (stillId, startsAt, endsAt: managers, planners, distillers) or edit the
 * booking itself (type, status, operator, charge, ferments, feeds, notes: managers and planners).
 */
export const PATCH = route({ auth: 'runs.move', body: updateRunSchema }, async ({ ctx, body, params }) => {
  const id = idParam(params.id);
  if (!onlyMoves(body) && !can(ctx.actor.role, 'runs.book')) throw new HttpError(403, 'forbidden', 'Your role can move runs but not change their booking.');
  const run = await updateRun(ctx, id, body);
  const warnings = await afterCommit(() => warningsForRun(ctx, run), null);
  return json({ run: runJson(run), warnings });
});
