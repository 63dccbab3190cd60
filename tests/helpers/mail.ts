/** The mail the app really sent, as the local fake SMTP server kept it: wait for one, and read its links. */
import { readMailbox, type StoredMail } from '../../src/server/mail/fake-smtp';

export const MAILBOX = process.env.MAILBOX_DIR ?? '.data/mailbox';

/** A fresh address for one test. */
export const unique = (prefix: string) => `${prefix}-${Date.now().toString(36)}${Math.floor(Math.random() * 1e6).toString(36)}@test.example`;

/** The first message to `to` whose subject contains `subjectPart`, waiting for the outbox to deliver it. */
export async function waitForMail(to: string, subjectPart: string, timeoutMs = 20000): Promise<StoredMail> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const m = readMailbox(MAILBOX).find((x) => x.to.includes(to) && x.subject.includes(subjectPart));
    if (m) return m;
    if (Date.now() > until) throw new Error(`no mail "${subjectPart}" to ${to} in ${MAILBOX}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

/** The `path/<token>` link in a message: its full URL, its path and the token. */
export function linkIn(m: StoredMail, path: string): { url: string; path: string; token: string } {
  const match = new RegExp(`https?://[^\\s/]+(${path}/([A-Za-z0-9_-]+))`).exec(m.text);
  if (!match) throw new Error(`no ${path} link in: ${m.text}`);
  return { url: match[0], path: match[1]!, token: match[2]! };
}
