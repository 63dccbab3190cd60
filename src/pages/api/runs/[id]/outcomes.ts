import { route, json, idParam } from '../../../../server/http';
import { getRunRecord, outcomesBodySchema, runRecordJson, saveRunRecord } from '../../../../server/outcomes';

/** The run's record: charge, fractions with strength at 20 °C and LAA, recovery. */
export const GET = route({ auth: 'runs.operate' }, async ({ ctx, params }) => {
  return json({ record: runRecordJson(await getRunRecord(ctx, idParam(params.id))) });
});

/** Replace every fraction (and the charge) in one transaction; `finish: true` also marks a running run done. */
export const PUT = route({ auth: 'runs.operate', body: outcomesBodySchema }, async ({ ctx, body, params }) => {
  const record = await saveRunRecord(ctx, idParam(params.id), body);
  return json({ record: runRecordJson(record) });
});
