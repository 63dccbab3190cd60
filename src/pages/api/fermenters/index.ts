import { route, json } from '../../../server/http';
import { createFermenter, fermenterInputSchema, listFermenters } from '../../../server/vessels';
import { parseVolumeToLitres, volumeUnitFor } from '../../../lib/units';

export const GET = route({ auth: 'ferments.read' }, async ({ ctx }) => json({ fermenters: await listFermenters(ctx) }));

export const POST = route({ auth: 'vessels.manage', body: fermenterInputSchema }, async ({ ctx, body }) => {
  const { capacity, ...rest } = body;
  const fermenter = await createFermenter(ctx, { ...rest, capacityLitres: parseVolumeToLitres(capacity, volumeUnitFor(ctx.ws.units)) });
  return json({ fermenter }, 201);
});
