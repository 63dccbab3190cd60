import { route, json, idParam } from '../../../server/http';
import { deleteReading, readingInputSchema, updateReading } from '../../../server/readings';

/** Edit a reading: the old and new values go to the audit log. */
export const PATCH = route({ auth: 'readings.write', body: readingInputSchema.partial() }, async ({ ctx, body, params }) => {
  const reading = await updateReading(ctx, idParam(params.id), body);
  return json({ reading });
});

/** Soft delete: the reading is kept (deleted_at) and recorded in the audit log. */
export const DELETE = route({ auth: 'readings.write' }, async ({ ctx, params }) => {
  await deleteReading(ctx, idParam(params.id));
  return new Response(null, { status: 204 });
});
