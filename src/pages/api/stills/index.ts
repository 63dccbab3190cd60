import { route, json } from '../../../server/http';
import { createStill, listStills, stillInputSchema } from '../../../server/stills';

export const GET = route({ action: 'board.read' }, async ({ auth }) => json({ stills: await listStills(auth.workspaceId, { includeInactive: true }) }));

export const POST = route({ action: 'vessels.manage', body: stillInputSchema }, async ({ auth, body }) =>
  json({ still: await createStill(auth.workspaceId, auth.userId, body) }, 201));
