import { route } from '../../../server/http';
import { getReport, reportQuerySchema, resolveFilters } from '../../../server/reports';
import { attachment, CSV_CONTENT_TYPE, safeFileName, utilisationCsv } from '../../../server/exports';

/** CSV: per still and ISO week, available / booked / done / idle-waiting hours and utilisation. */
export const GET = route({ action: 'reports.read', query: reportQuerySchema }, async ({ auth, query }) => {
  const filters = resolveFilters(query, auth.timeZone);
  const report = await getReport({ id: auth.workspaceId, timeZone: auth.timeZone }, filters);
  return attachment(utilisationCsv(report.utilisation), safeFileName('utilisation', filters, 'csv', filters.stillId), CSV_CONTENT_TYPE);
});
