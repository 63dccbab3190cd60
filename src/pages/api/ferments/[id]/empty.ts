import { z } from 'zod';
import { route, json, idParam } from '../../../../server/http';
import { emptyFerment, fermentJson } from '../../../../server/ferments';

const body = z.object({
  reason: z.enum(['distilled', 'dumped'], { error: 'Say whether the wash went to the still or was dumped.' }),
  at: z.string().max(40).optional(),
});

/** Mark the fermenter emptied: the wash went to the still (distilled) or was dumped. Frees the fermenter. */
export const POST = route({ action: 'ferments.write', body }, async ({ ctx, auth, body, params }) => {
  const ferment = await emptyFerment(ctx.locals.workspace!, auth.userId, idParam(params.id), body);
  return json({ ferment: fermentJson(ferment) });
});
