import { route, json, idParam } from '../../../server/http';
import { deleteReading, updateReading } from '../../../server/readings';
import { readingBody } from '../ferments/[id]/readings';

/** Edit a reading: the old and new values go to the audit log. */
export const PATCH = route({ action: 'readings.write', body: readingBody.partial() }, async ({ ctx, auth, body, params }) => {
  const reading = await updateReading(ctx.locals.workspace!, auth.userId, idParam(params.id), body);
  return json({ reading });
});

/** Soft delete: the reading is kept (deleted_at) and recorded in the audit log. */
export const DELETE = route({ action: 'readings.write' }, async ({ ctx, auth, params }) => {
  await deleteReading(ctx.locals.workspace!, auth.userId, idParam(params.id));
  return new Response(null, { status: 204 });
});
