/**
 * Checks run once when a server process starts. In production mode (the default), a
 * database that still holds the demo distillery — whose sign-ins are published in the
 * README — is reported loudly: those accounts cannot sign in (see signIn and the
 * middleware), and the distillery should be deleted.
 */
import { demoAllowed, env } from '../config';
import { countDemoWorkspaces } from './workspaces';

const KEY = Symbol.for('plateau.startupChecks');

export function runStartupChecks(): void {
  const g = globalThis as unknown as Record<symbol, boolean | undefined>;
  if (g[KEY]) return;
  g[KEY] = true;
  const mode = env().PLATEAU_MODE;
  if (!process.env.PLATEAU_MODE)
    console.warn('[plateau] PLATEAU_MODE is not set: running in production mode (no demo sign-ins, no local mailbox). `npm start` sets PLATEAU_MODE=demo.');
  if (demoAllowed(mode)) {
    console.log(`[plateau] ${mode} mode: the demo distillery and the local mailbox are enabled. Never expose this server to the internet.`);
    return;
  }
  void countDemoWorkspaces()
    .then((n) => {
      if (n > 0) {
        console.error(
          [
            '',
            '[plateau] !!! SECURITY: this production database holds the demo distillery, whose sign-ins and',
            '[plateau] !!! password are published. Sign-in and sessions for its members are DISABLED in production',
            '[plateau] !!! mode. Delete the demo distillery (Settings -> delete, as its manager, in demo mode) or',
            '[plateau] !!! use a fresh database for production.',
            '',
          ].join('\n'),
        );
      }
    })
    .catch((err) => console.error('[plateau] startup check failed:', err instanceof Error ? err.message : String(err)));
}
