import { route, json, idParam } from '../../../../server/http';
import { getForecast, forecastJson } from '../../../../server/forecasts';
import { notFound } from '../../../../server/http';

export const GET = route({ action: 'ferments.read' }, async ({ auth, params }) => {
  const forecast = await getForecast(auth.workspaceId, idParam(params.id));
  if (!forecast) throw notFound('No such ferment.');
  return json({ forecast: forecastJson(forecast) });
});
