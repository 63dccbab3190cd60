/** The board island's calls to the API. Errors come back as values, never thrown at the UI. */
import type { BoardPayload, BoardRunJson } from '../../lib/board';
import type { Warning } from '../../lib/schedule';

export interface ApiError {
  status: number;
  code: string;
  message: string;
  fields?: Record<string, string>;
  current?: BoardRunJson;
}

export type Result<T> = { ok: true; data: T } | { ok: false; error: ApiError };

async function call<T>(method: string, url: string, body?: unknown, extraHeaders: Record<string, string> = {}): Promise<Result<T>> {
  try {
    const res = await fetch(url, {
      method,
      headers: { accept: 'application/json', ...(body !== undefined ? { 'content-type': 'application/json' } : {}), ...extraHeaders },
      body: body !== undefined ? JSON.stringify(body) : undefined,
      credentials: 'same-origin',
    });
    const text = await res.text();
    const json = text ? JSON.parse(text) : null;
    if (res.ok) return { ok: true, data: json as T };
    return {
      ok: false,
      error: {
        status: res.status,
        code: json?.error?.code ?? 'error',
        message: json?.error?.message ?? `The server answered ${res.status}.`,
        fields: json?.error?.fields,
        current: json?.current,
      },
    };
  } catch {
    return { ok: false, error: { status: 0, code: 'offline', message: 'Could not reach Plateau. Check the connection and try again.' } };
  }
}

export interface RunAnswer {
  run: BoardRunJson;
  warnings?: Warning[];
}

export const api = {
  /** `fresh` after a change of ours: the server must not answer from what it remembered a moment ago. */
  board: (from: Date, to: Date, fresh = false) =>
    call<BoardPayload>(
      'GET',
      `/api/board?from=${encodeURIComponent(from.toISOString())}&to=${encodeURIComponent(to.toISOString())}`,
      undefined,
      fresh ? { 'cache-control': 'no-cache' } : {},
    ),
  createRun: (body: Record<string, unknown>) => call<RunAnswer>('POST', '/api/runs', body),
  updateRun: (id: number, body: Record<string, unknown>) => call<RunAnswer>('PATCH', `/api/runs/${id}`, body),
  cancelRun: (id: number, version: number) => call<RunAnswer>('POST', `/api/runs/${id}/cancel`, { version }),
  suggestions: (runId: number) =>
    call<{ runId: number; notBefore: string; slots: Array<{ stillId: number; startsAt: string; endsAt: string }> }>(
      'GET',
      `/api/board/suggestions?runId=${runId}`,
    ),
};
