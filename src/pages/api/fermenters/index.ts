import { z } from 'zod';
import { route, json } from '../../../server/http';
import { createFermenter, listFermenters } from '../../../server/vessels';
import { parseVolumeToLitres, volumeUnitFor } from '../../../lib/units';

export const fermenterBody = z.object({
  name: z.string().trim().min(1, 'Give the fermenter a name.').max(80),
  /** In the workspace's volume unit (L or US gal). */
  capacity: z.number({ error: 'Enter the capacity as a number.' }).positive('Capacity must be above zero.').max(1_000_000),
  active: z.boolean().optional(),
  position: z.number().int().min(0).max(10_000).optional(),
});

export const GET = route({ action: 'ferments.read' }, async ({ auth }) => json({ fermenters: await listFermenters(auth.workspaceId) }));

export const POST = route({ action: 'vessels.manage', body: fermenterBody }, async ({ ctx, auth, body }) => {
  const units = ctx.locals.workspace!.units;
  const { capacity, ...rest } = body;
  const fermenter = await createFermenter(auth.workspaceId, auth.userId, { ...rest, capacityLitres: parseVolumeToLitres(capacity, volumeUnitFor(units)) });
  return json({ fermenter }, 201);
});
