import { route, json, idParam } from '../../../../server/http';
import { removeStill, stillInputSchema, updateStill } from '../../../../server/stills';

export const PATCH = route({ action: 'vessels.manage', body: stillInputSchema.partial() }, async ({ auth, body, params }) =>
  json({ still: await updateStill(auth.workspaceId, auth.userId, idParam(params.id), body) }));

export const DELETE = route({ action: 'vessels.manage' }, async ({ auth, params }) =>
  json(await removeStill(auth.workspaceId, auth.userId, idParam(params.id))));
