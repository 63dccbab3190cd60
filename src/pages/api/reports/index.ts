import { route, json } from '../../../server/http';
import { getReport, reportJson, reportQuerySchema, resolveFilters } from '../../../server/reports';

/** The manager's figures for a date range (from, to: local dates, inclusive) and optionally one still. */
export const GET = route({ action: 'reports.read', query: reportQuerySchema }, async ({ auth, query }) => {
  const filters = resolveFilters(query, auth.timeZone);
  return json({ report: reportJson(await getReport({ id: auth.workspaceId, timeZone: auth.timeZone }, filters)) });
});
