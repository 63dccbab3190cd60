/**
 * The background jobs of one server process: the mail outbox sender and the daily digest check.
 * Started once at server start (scripts/serve.ts; under `astro dev`, the middleware), never from
 * a request. Each job guards itself, so a second call is a no-op; OUTBOX_DISABLED=1 starts neither.
 */
import { ensureOutboxSender } from './mail/outbox';
import { ensureDigestScheduler } from './digest';

export function startBackgroundJobs(): void {
  ensureOutboxSender();
  ensureDigestScheduler();
}
