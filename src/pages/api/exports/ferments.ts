import { route } from '../../../server/http';
import { reportQuerySchema, resolveFilters } from '../../../server/reports';
import { attachment, CSV_CONTENT_TYPE, fermentsCsv, safeFileName } from '../../../server/exports';

/** CSV: ferments pitched in the range, one row per reading. */
export const GET = route({ action: 'reports.read', query: reportQuerySchema }, async ({ auth, query }) => {
  const filters = resolveFilters(query, auth.timeZone);
  const csv = await fermentsCsv({ id: auth.workspaceId, timeZone: auth.timeZone }, filters);
  return attachment(csv, safeFileName('ferments-readings', filters, 'csv'), CSV_CONTENT_TYPE);
});
