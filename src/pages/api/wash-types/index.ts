import { route, json } from '../../../server/http';
import { createWashType, listWashTypes, washTypeInputSchema } from '../../../server/vessels';

export const GET = route({ auth: 'ferments.read' }, async ({ ctx }) => json({ washTypes: await listWashTypes(ctx) }));

export const POST = route({ auth: 'washtypes.manage', body: washTypeInputSchema }, async ({ ctx, body }) =>
  json({ washType: await createWashType(ctx, body) }, 201),
);
