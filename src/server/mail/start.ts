/** Imported for its side effect: starts the outbox sender once in this server process. */
import { ensureOutboxSender } from './outbox';

ensureOutboxSender();
