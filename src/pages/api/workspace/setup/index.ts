import { route, json } from '../../../../server/http';
import { setupProgress } from '../../../../server/setup';

/** The getting-started checklist as data: each step done or not, "n of 6", put away or not. */
export const GET = route({ auth: 'setup.read' }, async ({ ctx }) => json({ setup: await setupProgress(ctx) }));
