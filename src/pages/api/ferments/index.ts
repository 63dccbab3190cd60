import { z } from 'zod';
import { route, json } from '../../../server/http';
import { createFerment, fermentJson, listFerments } from '../../../server/ferments';

const sgField = (what: string) => z.number({ error: `Enter the ${what} as an SG, e.g. 1.060.` }).min(1, `The ${what} must be at least 1.000.`).max(1.2, `The ${what} must be at most 1.200.`);

export const fermentBody = z.object({
  code: z.string().trim().min(1, 'Give the ferment a code, e.g. FV3-0412.').max(40, 'Keep the code to 40 characters.'),
  washTypeId: z.number({ error: 'Choose a wash type.' }).int().positive('Choose a wash type.'),
  fermenterId: z.number().int().positive().nullable(),
  /** In the workspace's volume unit. */
  volume: z.number({ error: 'Enter the volume as a number.' }).positive('The volume must be above zero.').max(1_000_000),
  pitchedAt: z.string({ error: 'Give the pitch time.' }).min(1, 'Give the pitch time.').max(40),
  og: sgField('OG'),
  yeast: z.string().trim().max(120).nullable().optional(),
  notes: z.string().max(5000).nullable().optional(),
  /** Quantities in the workspace's mass unit (kg or lb). */
  ingredients: z.array(z.object({
    name: z.string().trim().max(120),
    quantity: z.number({ error: 'Enter the quantity as a number.' }).min(0).max(1_000_000),
  })).max(30).optional(),
});

const listQuery = z.object({
  state: z.enum(['active', 'emptied', 'all']).optional(),
  washTypeId: z.coerce.number().int().positive().optional(),
  fermenterId: z.coerce.number().int().positive().optional(),
});

export const GET = route({ action: 'ferments.read', query: listQuery }, async ({ auth, query }) => {
  const rows = await listFerments(auth.workspaceId, query);
  return json({ ferments: rows });
});

export const POST = route({ action: 'ferments.write', body: fermentBody }, async ({ ctx, auth, body }) => {
  const ferment = await createFerment(ctx.locals.workspace!, auth.userId, body);
  return json({ ferment: fermentJson(ferment) }, 201);
});
