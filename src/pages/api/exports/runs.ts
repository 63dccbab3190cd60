import { route } from '../../../server/http';
import { reportQuerySchema, resolveFilters } from '../../../server/reports';
import { attachment, CSV_CONTENT_TYPE, runsCsv, safeFileName } from '../../../server/exports';
import { getStill } from '../../../server/stills';

/** CSV: runs starting in the range (optionally one still), one row per recorded fraction. */
export const GET = route({ action: 'reports.read', query: reportQuerySchema }, async ({ auth, query }) => {
  const filters = resolveFilters(query, auth.timeZone);
  if (filters.stillId) await getStill(auth.workspaceId, filters.stillId);
  const csv = await runsCsv({ id: auth.workspaceId, timeZone: auth.timeZone }, filters);
  return attachment(csv, safeFileName('runs-outcomes', filters, 'csv', filters.stillId), CSV_CONTENT_TYPE);
});
