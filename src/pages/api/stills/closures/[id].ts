import { route, idParam } from '../../../../server/http';
import { removeClosure } from '../../../../server/stills';

export const DELETE = route({ auth: 'vessels.manage' }, async ({ ctx, params }) => {
  await removeClosure(ctx, idParam(params.id));
  return new Response(null, { status: 204 });
});
