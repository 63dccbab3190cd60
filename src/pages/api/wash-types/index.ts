import { z } from 'zod';
import { route, json } from '../../../server/http';
import { createWashType, listWashTypes } from '../../../server/vessels';
import { WASH_CATEGORIES } from '../../../db/schema';

const sg = (what: string) => z.number({ error: `Enter the ${what} as an SG, e.g. 1.004.` }).min(0.98, `The ${what} must be at least 0.980.`).max(1.2, `The ${what} must be at most 1.200.`);

export const washTypeBody = z.object({
  name: z.string().trim().min(1, 'Give the wash type a name.').max(80),
  category: z.enum(WASH_CATEGORIES, { error: 'Choose sugar, grain, molasses, fruit or other.' }),
  terminalMin: sg('bottom of the terminal range'),
  terminalMax: sg('top of the terminal range'),
  typicalOg: sg('typical OG').nullable().optional(),
});

export const GET = route({ action: 'ferments.read' }, async ({ auth }) => json({ washTypes: await listWashTypes(auth.workspaceId) }));

export const POST = route({ action: 'washtypes.manage', body: washTypeBody }, async ({ auth, body }) =>
  json({ washType: await createWashType(auth.workspaceId, auth.userId, body) }, 201));
