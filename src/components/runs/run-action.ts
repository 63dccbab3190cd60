/** Starting and finishing a run from a browser: the call, and the answers it can get (done, questions to confirm, refused). */

export type RunAction = 'start' | 'finish';

export type RunActionAnswer =
  | { kind: 'done'; run: { id: number; version: number; status: string } }
  | { kind: 'confirm'; warnings: string[] }
  | { kind: 'stale'; message: string }
  | { kind: 'error'; message: string };

/** POST /api/runs/:id/start|finish with the version seen; `confirm` once the person has accepted the server's questions. */
export async function sendRunAction(runId: number, action: RunAction, version: number, confirm = false): Promise<RunActionAnswer> {
  try {
    const res = await fetch(`/api/runs/${runId}/${action}`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', accept: 'application/json' },
      credentials: 'same-origin',
      body: JSON.stringify(confirm ? { version, confirm: true } : { version }),
    });
    const body = await res.json().catch(() => null);
    if (res.ok && body?.run) return { kind: 'done', run: body.run };
    if (res.status === 409 && body?.error?.code === 'confirm_required' && Array.isArray(body.warnings)) return { kind: 'confirm', warnings: body.warnings };
    if (res.status === 409 && body?.error?.code === 'stale') return { kind: 'stale', message: 'Someone changed this run meanwhile; reload to see it.' };
    return { kind: 'error', message: body?.error?.message ?? `Not saved (${res.status}).` };
  } catch {
    return { kind: 'error', message: 'Could not reach Plateau. Check the connection and try again.' };
  }
}

/** What pressing the button will do, in words, before anything is sent. */
export function actionExplained(action: RunAction, label: string, nowHm: string, bookedHm: string): string {
  return action === 'start'
    ? `Start this ${label} now? Its start is recorded as ${nowHm}; the booking (${bookedHm}) is kept beside it for comparison.`
    : `Finish this ${label} now? Its finish is recorded as ${nowHm} and the still is free for cleaning and the next run.`;
}
