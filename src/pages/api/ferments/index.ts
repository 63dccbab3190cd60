import { route, json } from '../../../server/http';
import { createFerment, fermentInputSchema, fermentJson, fermentListQuery, listFerments } from '../../../server/ferments';

export const GET = route({ auth: 'ferments.read', query: fermentListQuery }, async ({ ctx, query }) => {
  const rows = await listFerments(ctx, query);
  return json({ ferments: rows });
});

export const POST = route({ auth: 'ferments.start', body: fermentInputSchema }, async ({ ctx, body }) => {
  const ferment = await createFerment(ctx, body);
  return json({ ferment: fermentJson(ferment) }, 201);
});
