import { route, idParam } from '../../../../server/http';
import { removeClosure } from '../../../../server/stills';

export const DELETE = route({ action: 'vessels.manage' }, async ({ auth, params }) => {
  await removeClosure(auth.workspaceId, auth.userId, idParam(params.id));
  return new Response(null, { status: 204 });
});
