import { route, json, idParam, nonEmpty } from '../../../server/http';
import { updateFermenter } from '../../../server/vessels';
import { parseVolumeToLitres, volumeUnitFor } from '../../../lib/units';
import { fermenterBody } from './index';

export const PATCH = route({ action: 'vessels.manage', body: nonEmpty(fermenterBody.partial()) }, async ({ ctx, auth, body, params }) => {
  const id = idParam(params.id);
  const units = ctx.locals.workspace!.units;
  const { capacity, ...rest } = body;
  const fermenter = await updateFermenter(auth.workspaceId, auth.userId, id, {
    ...rest, ...(capacity !== undefined ? { capacityLitres: parseVolumeToLitres(capacity, volumeUnitFor(units)) } : {}),
  });
  return json({ fermenter });
});
