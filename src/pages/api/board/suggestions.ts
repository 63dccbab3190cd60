import { z } from 'zod';
import { route, json, idParam } from '../../../server/http';
import { suggestSlots } from '../../../server/board';

const query = z.object({ runId: z.string() });

/** Earliest feasible slots for moving a run at risk. */
export const GET = route({ auth: 'runs.move', query }, async ({ ctx, query }) => {
  return json(await suggestSlots(ctx, idParam(query.runId)));
});
