/**
 * The demo / development mailbox page: the mail this distillery itself sent, read from the
 * outbox by the outbox's own workspace (never by matching recipients), newest first, with
 * every secret-bearing link removed. Sign-up confirmations and password resets belong to no
 * distillery, so they never appear here; in demo and development mode the server prints
 * such links to its own console as they are sent (see announceDemoLinks).
 */
import { desc, eq } from 'drizzle-orm';
import { getDb } from '../db/client';
import { mailOutbox } from '../db/schema';
import { demoAllowed, env } from '../config';
import { redactSecretLinks, secretLinksIn } from '../lib/web';

export interface MailboxEntry {
  id: number;
  kind: string;
  to: string;
  subject: string;
  text: string;
  status: string;
  queuedAt: Date;
  sentAt: Date | null;
}

export const MAILBOX_PAGE_SIZE = 100;

export async function listWorkspaceMail(workspaceId: number, limit = MAILBOX_PAGE_SIZE): Promise<MailboxEntry[]> {
  const rows = await getDb()
    .select({
      id: mailOutbox.id,
      kind: mailOutbox.kind,
      to: mailOutbox.toAddress,
      subject: mailOutbox.subject,
      text: mailOutbox.textBody,
      status: mailOutbox.status,
      queuedAt: mailOutbox.createdAt,
      sentAt: mailOutbox.sentAt,
    })
    .from(mailOutbox)
    .where(eq(mailOutbox.workspaceId, workspaceId))
    .orderBy(desc(mailOutbox.id))
    .limit(limit);
  return rows.map((r) => ({ ...r, text: redactSecretLinks(r.text) }));
}

/** The mailbox page exists only where the demo does (demo, development and test mode). */
export const mailboxPageEnabled = () => demoAllowed();

/**
 * In demo and development mode only, print the secret links of a message just handed to the
 * fake SMTP server to this server's own console, so someone trying the demo can still confirm
 * a sign-up or reset a password. Nothing secret is served over HTTP.
 */
export function announceDemoLinks(mail: { kind: string; to: string; text: string }): void {
  const mode = env().PLATEAU_MODE;
  if (mode !== 'demo' && mode !== 'development') return;
  const links = secretLinksIn(mail.text);
  if (!links.length) return;
  console.log(`[plateau] demo mail (${mail.kind}) to ${mail.to}:\n${links.map((l) => `    ${l}`).join('\n')}`);
}
