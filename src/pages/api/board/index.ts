import { z } from 'zod';
import { route, invalid } from '../../../server/http';
import { getBoardJson, MAX_RANGE_DAYS } from '../../../server/board';

const query = z.object({
  from: z.iso.datetime({ offset: true }).transform((s) => new Date(s)),
  to: z.iso.datetime({ offset: true }).transform((s) => new Date(s)),
});

/** The board for [from, to): stills, runs, ferments with forecasts, fermenters, people. */
export const GET = route({ action: 'board.read', query }, async ({ ctx, auth, query }) => {
  const days = (query.to.getTime() - query.from.getTime()) / 86_400_000;
  if (!(days > 0)) throw invalid('to', 'The range must end after it starts.');
  if (days > MAX_RANGE_DAYS) throw invalid('to', `Ask for at most ${MAX_RANGE_DAYS} days at a time.`);
  const ws = ctx.locals.workspace!;
  const body = await getBoardJson({ id: auth.workspaceId, timeZone: ws.timeZone, stableDays: ws.stableDays }, query.from, query.to);
  return new Response(body, { status: 200, headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store' } });
});
