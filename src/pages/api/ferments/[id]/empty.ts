import { route, json, idParam } from '../../../../server/http';
import { emptyFerment, emptyInputSchema, fermentJson } from '../../../../server/ferments';

/** Mark the fermenter emptied: the wash went to the still (distilled) or was dumped. Frees the fermenter. */
export const POST = route({ auth: 'ferments.write', body: emptyInputSchema }, async ({ ctx, body, params }) => {
  const ferment = await emptyFerment(ctx, idParam(params.id), body);
  return json({ ferment: fermentJson(ferment) });
});
