import type { APIContext } from 'astro';

/** The client's address. Behind a proxy, set TRUST_PROXY=1 to read X-Forwarded-For. */
export function clientIp(ctx: Pick<APIContext, 'clientAddress' | 'request'>): string {
  if (process.env.TRUST_PROXY === '1') {
    const fwd = ctx.request.headers.get('x-forwarded-for');
    if (fwd) return fwd.split(',')[0]!.trim().slice(0, 64);
  }
  try { return ctx.clientAddress ?? 'unknown'; } catch { return 'unknown'; }
}
