import type { APIContext, APIRoute } from 'astro';
import { z, type ZodType } from 'zod';
import { can, type Action } from './authz';
import { isDbUnavailable } from './db-errors';
import { clientIp } from './request';
import type { Ctx, UserCtx } from './context';

/** The one JSON error shape: { error: { code, message, fields? } }. */
export function jsonError(status: number, code: string, message: string, fields?: Record<string, string>, headers: Record<string, string> = {}): Response {
  return new Response(JSON.stringify({ error: { code, message, ...(fields ? { fields } : {}) } }), {
    status,
    headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store', ...headers },
  });
}

export function json(data: unknown, status = 200, headers: Record<string, string> = {}): Response {
  return new Response(JSON.stringify(data), {
    status,
    headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store', ...headers },
  });
}

/** Thrown from server/ code to answer with a specific status. */
export class HttpError extends Error {
  constructor(
    public status: number,
    public code: string,
    message: string,
    public fields?: Record<string, string>,
    public extra?: Record<string, unknown>,
  ) {
    super(message);
  }
}
export const notFound = (what = 'Not found') => new HttpError(404, 'not_found', what);
export const conflict = (message: string, extra?: Record<string, unknown>) => new HttpError(409, 'conflict', message, undefined, extra);
export const invalid = (field: string, message: string) => new HttpError(400, 'invalid', message, { [field]: message });

const EXPECTED_WORDS: Record<string, string> = {
  number: 'Enter a number.',
  int: 'Enter a whole number.',
  string: 'Fill this in.',
  boolean: 'Choose yes or no.',
  array: 'Give a list here.',
  object: 'Give the details here.',
  date: 'Enter a date.',
};

/**
 * An issue's message in words. Our schemas word their own messages; where zod's default wording
 * would reach a person ("Invalid input: expected number, received null") it says what to do instead.
 */
function issueInWords(issue: z.core.$ZodIssue): string {
  if (!issue.message.startsWith('Invalid input')) return issue.message;
  if (issue.code === 'invalid_type') {
    const expected = String((issue as { expected?: unknown }).expected ?? '');
    return EXPECTED_WORDS[expected] ?? 'Check this value.';
  }
  if (issue.code === 'invalid_value') return 'Choose one of the options offered.';
  return 'Check this value.';
}

/** Map zod issues to { "path.to.field": "message" }. */
export function zodFields(error: z.ZodError): Record<string, string> {
  const fields: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.join('.') : '_';
    if (!fields[key]) fields[key] = issueInWords(issue);
  }
  return fields;
}

/**
 * The one 400 answer for input that does not parse (what route() sends). The message is the
 * first field's message in words ("Give the still a name."), never prefixed with the field's
 * key: `fields` names the field, and forms show each message beside its own input.
 */
export function invalidResponse(error: z.ZodError): Response {
  const fields = zodFields(error);
  const first = Object.values(fields)[0];
  return jsonError(400, 'invalid', first ?? 'Check the form and try again.', fields);
}

export const MAX_JSON_BYTES = 256 * 1024;

type Params = Record<string, string | undefined>;

/** What a route's handler receives, by the route's `auth`. */
export type RouteArgs<A, B, Q> = { req: APIContext; body: B; query: Q; params: Params } & (A extends 'public'
  ? { ctx?: undefined }
  : A extends 'user'
    ? { me: UserCtx }
    : { ctx: Ctx });

export interface RouteOptions<A extends Action | 'user' | 'public', B, Q> {
  /** An action from authz.ts (a role in this workspace may take it), 'user' (any signed-in person), or 'public'. */
  auth: A;
  body?: ZodType<B>;
  query?: ZodType<Q>;
  /** Body cap in bytes (default MAX_JSON_BYTES); past it the answer is 413. */
  maxBytes?: number;
}

/**
 * Every API route goes through here, in a fixed order:
 * 401 no session -> 403 role -> 400 invalid input (413 past the body cap) -> handler
 * (404 / 409 / 2xx). Thrown HttpErrors become their status; a lost database becomes 503
 * with Retry-After; anything else is a 500 without a stack trace.
 *
 *   export const POST = route({ auth: 'readings.write', body: ReadingBody }, async ({ ctx, body, params }) => ...)
 *   export const PATCH = route({ auth: 'user', body: NameBody }, async ({ me, body }) => ...)
 *   export const POST = route({ auth: 'public', body: SignUpBody }, async ({ req, body }) => ...)
 */
export function route<A extends Action | 'user' | 'public', B = undefined, Q = undefined>(
  opts: RouteOptions<A, B, Q>,
  handler: (args: RouteArgs<A, B, Q>) => Promise<Response>,
): APIRoute {
  const call = handler as unknown as (args: Record<string, unknown>) => Promise<Response>;
  return async (req) => {
    try {
      const { user, workspace, role, sessionId } = req.locals;
      const auth: Action | 'user' | 'public' = opts.auth;
      let who: Record<string, unknown> = {};
      if (auth === 'user') {
        if (!user || !sessionId) return jsonError(401, 'unauthenticated', 'Sign in first.');
        who = { me: { userId: user.id, email: user.email, name: user.name, sessionId, ip: clientIp(req) } satisfies UserCtx };
      } else if (auth !== 'public') {
        if (!user || !workspace || !role) return jsonError(401, 'unauthenticated', 'Sign in first.');
        if (!can(role, auth)) return jsonError(403, 'forbidden', 'Your role cannot do this.');
        const ctx: Ctx = { ws: workspace, actor: { userId: user.id, role, ip: clientIp(req) } };
        who = { ctx };
      }
      let query: unknown = undefined;
      if (opts.query) {
        const parsed = opts.query.safeParse(Object.fromEntries(req.url.searchParams.entries()));
        if (!parsed.success) return invalidResponse(parsed.error);
        query = parsed.data;
      }
      let body: unknown = undefined;
      if (opts.body) {
        const { raw } = await readBody(req.request, opts.maxBytes ?? MAX_JSON_BYTES);
        const parsed = opts.body.safeParse(raw);
        if (!parsed.success) return invalidResponse(parsed.error);
        body = parsed.data;
      }
      const params = req.params as Params;
      return await call({ req, body, query, params, ...who });
    } catch (err) {
      return errorResponse(err);
    }
  };
}

export function errorResponse(err: unknown): Response {
  if (err instanceof HttpError) {
    if (err.status === 429) {
      const retryAfter = Number(err.extra?.retryAfter ?? 60);
      return jsonError(429, err.code, err.message, err.fields, { 'retry-after': String(retryAfter) });
    }
    if (err.extra) {
      return json({ error: { code: err.code, message: err.message, ...(err.fields ? { fields: err.fields } : {}) }, ...err.extra }, err.status);
    }
    return jsonError(err.status, err.code, err.message, err.fields);
  }
  if (isDbUnavailable(err)) {
    return jsonError(503, 'unavailable', 'The database is not answering; try again shortly.', undefined, { 'retry-after': '5' });
  }
  console.error('[plateau] unhandled error:', err instanceof Error ? err.message : String(err));
  return jsonError(500, 'internal', 'Something went wrong on our side. It has been logged.');
}

/** Read a request body up to `limit` bytes; null when larger (refused early, by header or by stream). */
export async function readLimitedBytes(request: Request, limit: number): Promise<Buffer | null> {
  const declared = Number(request.headers.get('content-length') ?? '0');
  if (Number.isFinite(declared) && declared > limit) {
    await request.body?.cancel().catch(() => {});
    return null;
  }
  if (!request.body) return Buffer.alloc(0);
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limit) {
      await reader.cancel().catch(() => {});
      return null;
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks);
}

/** The same, decoded as UTF-8. */
export async function readLimitedText(request: Request, limit: number): Promise<string | null> {
  const bytes = await readLimitedBytes(request, limit);
  return bytes === null ? null : bytes.toString('utf8');
}

/**
 * Work done after a write has committed (read-backs, warnings, forecasts) must not turn a
 * stored change into an error answer: on failure it logs and gives the fallback, so the
 * client is never told to retry a write that happened.
 */
export async function afterCommit<T>(work: () => Promise<T>, fallback: T): Promise<T> {
  try {
    return await work();
  } catch (err) {
    console.error('[plateau] after-commit work failed:', err instanceof Error ? err.message : String(err));
    return fallback;
  }
}

/** A PATCH body must change something: an empty object is a 400, not a no-op write. */
export function nonEmpty<T extends z.ZodObject>(schema: T) {
  return schema.refine((o: Record<string, unknown>) => Object.values(o).some((v) => v !== undefined), { message: 'Send at least one field to change.' });
}

/** The cap on a form or JSON body of any route that does not declare its own (uploads do). */
export const MAX_FORM_BYTES = MAX_JSON_BYTES;

export const tooLarge = (limit: number) => new HttpError(413, 'too_large', `The request body is over ${Math.round(limit / 1024)} kB.`);

/**
 * Parse a form body through the byte-limited reader (with or without Content-Length, a body
 * past the cap is refused with 413 before it is parsed); a malformed one is a 400, never a 500.
 */
export async function readForm(request: Request, limit = MAX_FORM_BYTES): Promise<FormData> {
  const bytes = await readLimitedBytes(request, limit);
  if (bytes === null) throw tooLarge(limit);
  try {
    return await new Response(new Uint8Array(bytes), { headers: { 'content-type': request.headers.get('content-type') ?? '' } }).formData();
  } catch {
    throw new HttpError(400, 'invalid_form', 'The form body could not be read.');
  }
}

/**
 * The one body reader for JSON and form posts: JSON (islands, tests) or a urlencoded /
 * multipart form (pages that work without JavaScript), always through the byte limit.
 */
export async function readBody(request: Request, limit = MAX_JSON_BYTES): Promise<{ raw: unknown; isForm: boolean }> {
  const type = request.headers.get('content-type') ?? '';
  const isForm = type.includes('application/x-www-form-urlencoded') || type.includes('multipart/form-data');
  if (isForm) {
    const form = await readForm(request, limit);
    const raw: Record<string, string> = {};
    for (const [k, v] of form.entries()) if (typeof v === 'string') raw[k] = v;
    return { raw, isForm };
  }
  const text = await readLimitedText(request, limit);
  if (text === null) throw tooLarge(limit);
  try {
    return { raw: text.length ? JSON.parse(text) : {}, isForm };
  } catch {
    throw new HttpError(400, 'invalid_json', 'The request body is not valid JSON.');
  }
}

/** Route params are ids: positive integers, else 404 (an id that cannot exist is not found). */
export function idParam(value: string | undefined): number {
  if (!value || !/^\d{1,15}$/.test(value)) throw notFound();
  const n = Number(value);
  if (!Number.isSafeInteger(n) || n <= 0) throw notFound();
  return n;
}
