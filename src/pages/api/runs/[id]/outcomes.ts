import { route, json, idParam } from '../../../../server/http';
import { getRunRecord, outcomesBodySchema, runRecordJson, saveRunRecord } from '../../../../server/outcomes';

/** The run's record: charge, fractions with strength at 20 °C and LAA, recovery. */
export const GET = route({ action: 'runs.operate' }, async ({ auth, params }) => {
  return json({ record: runRecordJson(await getRunRecord(auth.workspaceId, idParam(params.id))) });
});

/** Replace every fraction (and the charge) in one transaction; `finish: true` also marks a running run done. */
export const PUT = route({ action: 'runs.operate', body: outcomesBodySchema }, async ({ auth, body, params }) => {
  const record = await saveRunRecord(auth.workspaceId, auth.userId, idParam(params.id), body);
  return json({ record: runRecordJson(record) });
});
