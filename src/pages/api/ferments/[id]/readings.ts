import { z } from 'zod';
import { route, json, idParam } from '../../../../server/http';
import { getFerment } from '../../../../server/ferments';
import { addReading, listReadings } from '../../../../server/readings';
import { READING_METHODS, READING_UNITS } from '../../../../db/schema';

export const readingBody = z.object({
  value: z.number({ error: 'Enter the reading as a number.' }),
  unit: z.enum(READING_UNITS, { error: 'Choose SG, °Brix or °Plato.' }),
  method: z.enum(READING_METHODS, { error: 'Choose hydrometer, refractometer or digital sensor.' }),
  /** In the workspace's temperature unit (°C or °F). */
  sampleTemp: z.number({ error: 'Enter the sample temperature as a number.' }).nullable().optional(),
  /** ISO time with a zone, or a wall-clock time in the distillery's zone; defaults to now. */
  takenAt: z.string().max(40).nullable().optional(),
  note: z.string().max(500, 'Keep the note to 500 characters.').nullable().optional(),
  fermentTemp: z.number({ error: 'Enter the ferment temperature as a number.' }).nullable().optional(),
  ph: z.number({ error: 'Enter the pH as a number.' }).min(0, 'pH runs from 0 to 14.').max(14, 'pH runs from 0 to 14.').nullable().optional(),
});

export const GET = route({ action: 'ferments.read' }, async ({ auth, params }) => {
  const id = idParam(params.id);
  await getFerment(auth.workspaceId, id);
  return json({ readings: await listReadings(auth.workspaceId, id) });
});

export const POST = route({ action: 'readings.write', body: readingBody }, async ({ ctx, auth, body, params }) => {
  const reading = await addReading(ctx.locals.workspace!, auth.userId, idParam(params.id), body);
  return json({ reading }, 201);
});
