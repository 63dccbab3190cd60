import { route, json, idParam, nonEmpty } from '../../../server/http';
import { fermenterInputSchema, updateFermenter } from '../../../server/vessels';
import { parseVolumeToLitres, volumeUnitFor } from '../../../lib/units';

export const PATCH = route({ auth: 'vessels.manage', body: nonEmpty(fermenterInputSchema.partial()) }, async ({ ctx, body, params }) => {
  const id = idParam(params.id);
  const { capacity, ...rest } = body;
  const fermenter = await updateFermenter(ctx, id, {
    ...rest,
    ...(capacity !== undefined ? { capacityLitres: parseVolumeToLitres(capacity, volumeUnitFor(ctx.ws.units)) } : {}),
  });
  return json({ fermenter });
});
