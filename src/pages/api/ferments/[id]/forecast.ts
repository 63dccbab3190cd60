import { route, json, idParam, notFound } from '../../../../server/http';
import { getForecast, forecastJson } from '../../../../server/forecasts';

export const GET = route({ auth: 'ferments.read' }, async ({ ctx, params }) => {
  const forecast = await getForecast(ctx, idParam(params.id));
  if (!forecast) throw notFound('No such ferment.');
  return json({ forecast: forecastJson(forecast) });
});
