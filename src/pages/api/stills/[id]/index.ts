import { route, json, idParam } from '../../../../server/http';
import { removeStill, stillInputSchema, updateStill } from '../../../../server/stills';

export const PATCH = route({ auth: 'vessels.manage', body: stillInputSchema.partial() }, async ({ ctx, body, params }) =>
  json({ still: await updateStill(ctx, idParam(params.id), body) }),
);

export const DELETE = route({ auth: 'vessels.manage' }, async ({ ctx, params }) => json(await removeStill(ctx, idParam(params.id))));
