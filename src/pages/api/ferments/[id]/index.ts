import { route, json, idParam } from '../../../../server/http';
import { fermentInputSchema, fermentJson, getFerment, updateFerment } from '../../../../server/ferments';
import { listReadings } from '../../../../server/readings';
import { getForecast, forecastJson } from '../../../../server/forecasts';

/** The ferment, its readings and its forecast: what the ferment page's island redraws from. */
export const GET = route({ auth: 'ferments.read' }, async ({ ctx, params }) => {
  const id = idParam(params.id);
  const ferment = await getFerment(ctx, id);
  const [readings, forecast] = await Promise.all([listReadings(ctx, id), getForecast(ctx, id)]);
  return json({ ferment: fermentJson(ferment), readings, forecast: forecastJson(forecast) });
});

export const PATCH = route({ auth: 'ferments.write', body: fermentInputSchema.partial() }, async ({ ctx, body, params }) => {
  const ferment = await updateFerment(ctx, idParam(params.id), body);
  return json({ ferment: fermentJson(ferment) });
});
