import { route, json, idParam, notFound } from '../../../../../../server/http';
import { commitUpload } from '../../../../../../server/uploads';

export const POST = route({ auth: 'readings.write' }, async ({ ctx, params }) => {
  const id = idParam(params.id);
  const uploadId = params.uploadId ?? '';
  if (!/^[A-Za-z0-9_-]{16,64}$/.test(uploadId)) throw notFound('No such upload.');
  const result = await commitUpload(ctx, id, uploadId);
  return json(result);
});
