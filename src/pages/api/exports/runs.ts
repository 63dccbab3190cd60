import { route } from '../../../server/http';
import { reportQuerySchema, resolveFilters } from '../../../server/reports';
import { attachment, CSV_CONTENT_TYPE, runsCsv, safeFileName } from '../../../server/exports';
import { getStill } from '../../../server/stills';

/** CSV: runs starting in the range (optionally one still), one row per recorded fraction. */
export const GET = route({ auth: 'reports.read', query: reportQuerySchema }, async ({ ctx, query }) => {
  const filters = resolveFilters(query, ctx.ws.timeZone);
  if (filters.stillId) await getStill(ctx, filters.stillId);
  const csv = await runsCsv(ctx, filters);
  return attachment(csv, safeFileName('runs-outcomes', filters, 'csv', filters.stillId), CSV_CONTENT_TYPE);
});
