/**
 * A local fake SMTP server for development and tests, built on smtp-server. It accepts
 * every message and keeps it as JSON in a folder, so the dev mailbox page and the tests
 * can read what Plateau sent. It never relays anything anywhere.
 */
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';
import { mkdirSync, writeFileSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';

export interface StoredMail {
  id: string;
  messageId: string | null;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  receivedAt: string;
}

export function startFakeSmtp(opts: { port: number; dir: string; host?: string }): Promise<{ close: () => Promise<void>; port: number }> {
  mkdirSync(opts.dir, { recursive: true });
  let n = 0;
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('end', async () => {
        try {
          const parsed = await simpleParser(Buffer.concat(chunks));
          const id = `${Date.now()}-${process.pid}-${++n}`;
          const mail: StoredMail = {
            id,
            messageId: parsed.messageId ?? null,
            from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
            to: session.envelope.rcptTo.map((r) => r.address.toLowerCase()),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : '',
            receivedAt: new Date().toISOString(),
          };
          writeFileSync(path.join(opts.dir, `${id}.json`), JSON.stringify(mail));
          callback();
        } catch (err) {
          callback(err as Error);
        }
      });
    },
  });
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port, opts.host ?? '127.0.0.1', () => {
      const addr = server.server.address();
      const port = typeof addr === 'object' && addr ? addr.port : opts.port;
      resolve({ port, close: () => new Promise<void>((r) => server.close(() => r())) });
    });
  });
}

/** Messages kept by the fake server, newest first. */
export function readMailbox(dir: string): StoredMail[] {
  let files: string[] = [];
  try {
    files = readdirSync(dir).filter((f) => f.endsWith('.json'));
  } catch {
    return [];
  }
  const out: StoredMail[] = [];
  for (const f of files) {
    try {
      out.push(JSON.parse(readFileSync(path.join(dir, f), 'utf8')) as StoredMail);
    } catch {
      /* partly written; skip */
    }
  }
  return out.sort((a, b) => b.receivedAt.localeCompare(a.receivedAt) || b.id.localeCompare(a.id));
}
