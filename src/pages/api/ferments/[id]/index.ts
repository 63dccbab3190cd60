import { route, json, idParam } from '../../../../server/http';
import { fermentJson, getFerment, updateFerment } from '../../../../server/ferments';
import { listReadings } from '../../../../server/readings';
import { getForecast, forecastJson } from '../../../../server/forecasts';
import { fermentBody } from '../index';

/** The ferment, its readings and its forecast: what the ferment page's island redraws from. */
export const GET = route({ action: 'ferments.read' }, async ({ auth, params }) => {
  const id = idParam(params.id);
  const ferment = await getFerment(auth.workspaceId, id);
  const [readings, forecast] = await Promise.all([listReadings(auth.workspaceId, id), getForecast(auth.workspaceId, id)]);
  return json({ ferment: fermentJson(ferment), readings, forecast: forecastJson(forecast) });
});

export const PATCH = route({ action: 'ferments.write', body: fermentBody.partial() }, async ({ ctx, auth, body, params }) => {
  const ferment = await updateFerment(ctx.locals.workspace!, auth.userId, idParam(params.id), body);
  return json({ ferment: fermentJson(ferment) });
});
