/** In demo and development mode only, account-opening links are printed to the server's own console as they are sent. */
import { describe, it, expect, vi, afterEach } from 'vitest';

const mail = {
  kind: 'password_reset',
  to: 'someone@test.example',
  text: 'Choose a new password: http://127.0.0.1:4321/reset-password/AbCdEfGhIjKlMnOpQrStUv0123 (30 minutes)',
};

async function printedIn(mode: string | undefined): Promise<string> {
  vi.resetModules();
  if (mode === undefined) delete process.env.PLATEAU_MODE;
  else process.env.PLATEAU_MODE = mode;
  const lines: string[] = [];
  const spy = vi.spyOn(console, 'log').mockImplementation((...args: unknown[]) => {
    lines.push(args.join(' '));
  });
  try {
    const { announceDemoLinks } = await import('../../src/server/mailbox');
    announceDemoLinks(mail);
  } finally {
    spy.mockRestore();
  }
  return lines.join('\n');
}

describe('announceDemoLinks', () => {
  const before = process.env.PLATEAU_MODE;
  afterEach(() => {
    if (before === undefined) delete process.env.PLATEAU_MODE;
    else process.env.PLATEAU_MODE = before;
  });

  it.each([['demo'], ['development']])('prints the link in %s mode', async (mode) => {
    expect(await printedIn(mode)).toContain('http://127.0.0.1:4321/reset-password/AbCdEfGhIjKlMnOpQrStUv0123');
  });

  it.each([['production'], ['test'], [undefined]])('prints nothing in %s mode', async (mode) => {
    expect(await printedIn(mode)).toBe('');
  });
});
