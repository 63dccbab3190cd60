import { route, json } from '../../../server/http';
import { getReport, reportJson, reportQuerySchema, resolveFilters } from '../../../server/reports';

/** The manager's figures for a date range (from, to: local dates, inclusive) and optionally one still. */
export const GET = route({ auth: 'reports.read', query: reportQuerySchema }, async ({ ctx, query }) => {
  const filters = resolveFilters(query, ctx.ws.timeZone);
  return json({ report: reportJson(await getReport(ctx, filters)) });
});
