import { z } from 'zod';
import { route, json, idParam } from '../../../../server/http';
import { acceptReading } from '../../../../server/readings';

/** Accept a reading held for review (implausible or a likely duplicate): it counts in the forecast from now on. */
export const POST = route({ auth: 'readings.write', body: z.object({}) }, async ({ ctx, params }) => {
  const reading = await acceptReading(ctx, idParam(params.id));
  return json({ reading });
});
