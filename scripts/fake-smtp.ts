import { startFakeSmtp } from '../src/server/mail/fake-smtp';

const port = Number(process.env.SMTP_PORT ?? 2525);
const dir = process.env.MAILBOX_DIR ?? '.data/mailbox';
const server = await startFakeSmtp({ port, dir });
console.log(`[plateau] Fake SMTP listening on 127.0.0.1:${server.port}, keeping mail in ${dir}`);
const stop = async () => {
  await server.close();
  process.exit(0);
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
