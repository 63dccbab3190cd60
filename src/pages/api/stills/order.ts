import { z } from 'zod';
import { route, json } from '../../../server/http';
import { setStillOrder } from '../../../server/stills';

const body = z.object({ ids: z.array(z.number().int().positive()).min(1).max(200) });

/** Board order of the stills, top to bottom. */
export const PUT = route({ action: 'vessels.manage', body }, async ({ auth, body }) =>
  json({ stills: await setStillOrder(auth.workspaceId, auth.userId, body.ids) }));
