import { route, json } from '../../../server/http';
import { createStill, listStills, stillInputSchema } from '../../../server/stills';

export const GET = route({ auth: 'board.read' }, async ({ ctx }) => json({ stills: await listStills(ctx, { includeInactive: true }) }));

export const POST = route({ auth: 'vessels.manage', body: stillInputSchema }, async ({ ctx, body }) => json({ still: await createStill(ctx, body) }, 201));
