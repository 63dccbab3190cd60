import { route, json } from '../../../../server/http';
import { addClosure, closureInputSchema, listClosures } from '../../../../server/stills';

export const GET = route({ action: 'board.read' }, async ({ auth }) => json({ closures: await listClosures(auth.workspaceId) }));

export const POST = route({ action: 'vessels.manage', body: closureInputSchema }, async ({ auth, body }) =>
  json({ closure: await addClosure(auth.workspaceId, auth.userId, body) }, 201));
