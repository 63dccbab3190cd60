/**
 * Starting and finishing runs from the floor with the questions asked first (a start well before
 * the booking, a wash not confirmed stable, a feeding run not finished, a finish seconds after the
 * start). The words come from src/lib/schedule/actual-times.ts; the change itself is in runs.ts.
 */
import { startQuestions } from '../lib/schedule';
import type { BoardRun } from '../lib/board';
import { runContext } from './board';
import type { Ctx } from './context';
import { finishRun, getRun, startRun, type OperateInput } from './runs';

/** The sentences a start of this run now must be confirmed with (empty: nothing to ask). */
export async function startQuestionsFor(ctx: Ctx, run: BoardRun, now = new Date()): Promise<string[]> {
  if (run.status !== 'planned' && run.status !== 'confirmed') return [];
  const data = await runContext(ctx, run, now);
  const stillName = new Map(data.stills.map((s) => [s.id, s.name]));
  const runById = new Map(data.runs.map((r) => [r.id, r]));
  return startQuestions({
    run,
    now,
    marginMinutes: ctx.ws.startEarlyMarginMinutes,
    ferments: new Map(data.ferments.map((f) => [f.id, f])),
    feeders: new Map(
      run.feeds.flatMap((l) => {
        const r = runById.get(l.runId);
        return r ? [[l.runId, { status: r.status, startsAt: r.startsAt, stillName: stillName.get(r.stillId) ?? 'a retired still' }] as const] : [];
      }),
    ),
    timeZone: ctx.ws.timeZone,
  });
}

/** Start: 409 `confirm_required` with the questions in words unless `confirm` is sent; the audit row keeps what was accepted. */
export async function startRunAsked(ctx: Ctx, id: number, input: OperateInput): Promise<BoardRun> {
  const run = await getRun(ctx, id);
  const asked = await startQuestionsFor(ctx, run);
  return startRun(ctx, id, input.version, { confirm: input.confirm, questions: () => asked });
}

/** Finish: a finish within minutes of the start answers 409 `confirm_required` unless `confirm` is sent. */
export const finishRunAsked = (ctx: Ctx, id: number, input: OperateInput): Promise<BoardRun> => finishRun(ctx, id, input.version, { confirm: input.confirm });
