/** Imported for its side effect: starts the outbox sender and the digest scheduler once in this server process. */
import { ensureOutboxSender } from './outbox';
import { ensureDigestScheduler } from '../digest';

ensureOutboxSender();
ensureDigestScheduler();
