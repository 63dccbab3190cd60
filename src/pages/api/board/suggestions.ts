import { z } from 'zod';
import { route, json, idParam } from '../../../server/http';
import { suggestSlots } from '../../../server/board';

const query = z.object({ runId: z.string() });

/** Earliest feasible slots for moving a run at risk. */
export const GET = route({ action: 'runs.move', query }, async ({ ctx, auth, query }) => {
  const ws = ctx.locals.workspace!;
  return json(await suggestSlots({ id: auth.workspaceId, timeZone: ws.timeZone, stableDays: ws.stableDays }, idParam(query.runId)));
});
