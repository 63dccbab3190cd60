import { route, json, idParam } from '../../../../server/http';
import { getFerment } from '../../../../server/ferments';
import { addReading, listReadings, readingInputSchema } from '../../../../server/readings';

export const GET = route({ auth: 'ferments.read' }, async ({ ctx, params }) => {
  const id = idParam(params.id);
  await getFerment(ctx, id);
  return json({ readings: await listReadings(ctx, id) });
});

export const POST = route({ auth: 'readings.write', body: readingInputSchema }, async ({ ctx, body, params }) => {
  const reading = await addReading(ctx, idParam(params.id), body);
  return json({ reading }, 201);
});
