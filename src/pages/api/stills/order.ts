import { route, json } from '../../../server/http';
import { setStillOrder, stillOrderSchema } from '../../../server/stills';

/** Board order of the stills, top to bottom. */
export const PUT = route({ auth: 'vessels.manage', body: stillOrderSchema }, async ({ ctx, body }) => json({ stills: await setStillOrder(ctx, body.ids) }));
