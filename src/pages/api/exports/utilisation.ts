import { route } from '../../../server/http';
import { getReport, reportQuerySchema, resolveFilters } from '../../../server/reports';
import { attachment, CSV_CONTENT_TYPE, safeFileName, utilisationCsv } from '../../../server/exports';

/** CSV: per still and ISO week, available / booked / done / idle-waiting hours and utilisation. */
export const GET = route({ auth: 'reports.read', query: reportQuerySchema }, async ({ ctx, query }) => {
  const filters = resolveFilters(query, ctx.ws.timeZone);
  const report = await getReport(ctx, filters);
  return attachment(utilisationCsv(report.utilisation), safeFileName('utilisation', filters, 'csv', filters.stillId), CSV_CONTENT_TYPE);
});
