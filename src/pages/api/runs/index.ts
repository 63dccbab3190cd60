import { route, json, afterCommit } from '../../../server/http';
import { createRun, createRunSchema, runJson } from '../../../server/runs';
import { warningsForRun } from '../../../server/board';

/** Book a run (managers and planners). */
export const POST = route({ auth: 'runs.book', body: createRunSchema }, async ({ ctx, body }) => {
  const run = await createRun(ctx, body);
  const warnings = await afterCommit(() => warningsForRun(ctx, run), null);
  return json({ run: runJson(run), warnings }, 201);
});
