import { route } from '../../../server/http';
import { reportQuerySchema, resolveFilters } from '../../../server/reports';
import { attachment, CSV_CONTENT_TYPE, fermentsCsv, safeFileName } from '../../../server/exports';

/** CSV: ferments pitched in the range, one row per reading. */
export const GET = route({ auth: 'reports.read', query: reportQuerySchema }, async ({ ctx, query }) => {
  const filters = resolveFilters(query, ctx.ws.timeZone);
  const csv = await fermentsCsv(ctx, filters);
  return attachment(csv, safeFileName('ferments-readings', filters, 'csv'), CSV_CONTENT_TYPE);
});
