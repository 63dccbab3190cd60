import { route, json, idParam, nonEmpty } from '../../../server/http';
import { updateWashType, washTypeInputSchema } from '../../../server/vessels';

export const PATCH = route({ auth: 'washtypes.manage', body: nonEmpty(washTypeInputSchema.partial()) }, async ({ ctx, body, params }) =>
  json({ washType: await updateWashType(ctx, idParam(params.id), body) }),
);
