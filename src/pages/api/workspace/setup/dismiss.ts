import { z } from 'zod';
import { route, json } from '../../../../server/http';
import { setSetupDismissed } from '../../../../server/setup';

const Body = z.object({
  /** true (the default) puts the getting-started checklist away; false brings it back. */
  dismissed: z.union([z.boolean(), z.stringbool()], { error: 'Say true to put the checklist away or false to bring it back.' }).optional(),
});

/** A manager puts the getting-started checklist away: the board and the navigation stop showing its link. */
export const POST = route({ auth: 'settings.manage', body: Body }, async ({ ctx, body }) => {
  const dismissed = body.dismissed ?? true;
  const at = await setSetupDismissed(ctx, dismissed);
  return json({
    ok: true,
    dismissedAt: at,
    message: dismissed ? 'Getting started is put away. It stays at /setup if you want it.' : 'Getting started is back on the board.',
  });
});
