import { route, json, idParam } from '../../../../../server/http';
import { getFerment } from '../../../../../server/ferments';
import { readUploadText, stageUpload } from '../../../../../server/uploads';

/**
 * Logger CSV upload: the file as the raw body (text/csv) or as the "file" field of
 * multipart/form-data; at most 5 MB. Answers with a preview; nothing is imported until commit.
 */
export const POST = route({ auth: 'readings.write' }, async ({ ctx, req, params }) => {
  const id = idParam(params.id);
  await getFerment(ctx, id);
  const text = await readUploadText(req.request);
  const preview = await stageUpload(ctx, id, text);
  return json({ preview }, 201);
});
