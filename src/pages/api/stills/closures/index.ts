import { route, json } from '../../../../server/http';
import { addClosure, closureInputSchema, listClosures } from '../../../../server/stills';

export const GET = route({ auth: 'board.read' }, async ({ ctx }) => json({ closures: await listClosures(ctx) }));

export const POST = route({ auth: 'vessels.manage', body: closureInputSchema }, async ({ ctx, body }) => json({ closure: await addClosure(ctx, body) }, 201));
