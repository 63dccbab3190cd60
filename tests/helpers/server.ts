/**
 * Global setup for integration and e2e tests: uses the app that `npm test` started
 * (PLATEAU_TEST_URL), or builds nothing and starts the built app (scripts/serve.ts) itself when run
 * alone (`npx vitest run --project integration` after `npm run build`).
 */
import { spawn, type ChildProcess } from 'node:child_process';

let child: ChildProcess | null = null;

async function healthy(url: string): Promise<boolean> {
  try {
    return (await fetch(`${url}/api/health`)).ok;
  } catch {
    return false;
  }
}

export async function setup(): Promise<void> {
  const url = process.env.PLATEAU_TEST_URL ?? 'http://127.0.0.1:4399';
  process.env.PLATEAU_TEST_URL = url;
  process.env.DB_NAME ??= 'plateau_test';
  if (await healthy(url)) return;
  const port = new URL(url).port;
  child = spawn(process.execPath, ['--import', 'tsx', 'scripts/serve.ts'], {
    env: { ...process.env, HOST: '127.0.0.1', PORT: port, PLATEAU_MODE: 'test' },
    stdio: 'ignore',
  });
  for (let i = 0; i < 100 && !(await healthy(url)); i++) await new Promise((r) => setTimeout(r, 200));
}

export async function teardown(): Promise<void> {
  child?.kill();
}
