/**
 * Start a second copy of the built app on a spare port with its own environment (another
 * PLATEAU_MODE, an https PUBLIC_URL, a TRUST_PROXY list), on the same test database, for the
 * tests that need production behaviour or other settings than the shared test server has.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';

export interface SpawnedApp {
  url: string;
  port: number;
  stop: () => Promise<void>;
  log: () => string;
}

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const addr = srv.address();
      const port = typeof addr === 'object' && addr ? addr.port : 0;
      srv.close(() => resolve(port));
    });
  });
}

/** The command that serves the built app (the same one npm start and npm test use). */
export const SERVE_ARGS = ['--import', 'tsx', 'scripts/serve.ts'];

export async function spawnApp(env: Record<string, string | undefined>, opts: { port?: number } = {}): Promise<SpawnedApp> {
  const port = opts.port ?? (await freePort());
  const url = `http://127.0.0.1:${port}`;
  const childEnv: Record<string, string> = {};
  for (const [k, v] of Object.entries({ ...process.env, HOST: '127.0.0.1', PORT: String(port), PUBLIC_URL: url, OUTBOX_DISABLED: '1', ...env })) {
    if (v !== undefined) childEnv[k] = v;
  }
  let out = '';
  const child: ChildProcess = spawn(process.execPath, SERVE_ARGS, { env: childEnv, stdio: ['ignore', 'pipe', 'pipe'] });
  child.stdout?.on('data', (d) => {
    out += String(d);
  });
  child.stderr?.on('data', (d) => {
    out += String(d);
  });
  let healthy = false;
  for (let i = 0; i < 150 && !healthy; i++) {
    try {
      healthy = (await fetch(`${url}/api/health`)).ok;
    } catch {
      /* not yet */
    }
    if (child.exitCode !== null) throw new Error(`app exited: ${out}`);
    if (!healthy) await new Promise((r) => setTimeout(r, 200));
  }
  if (!healthy) {
    child.kill('SIGKILL');
    throw new Error(`app did not answer on ${url}: ${out}`);
  }
  return {
    url,
    port,
    log: () => out,
    stop: () =>
      new Promise<void>((resolve) => {
        if (child.exitCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill('SIGTERM');
        setTimeout(() => {
          child.kill('SIGKILL');
          resolve();
        }, 5000).unref();
      }),
  };
}
