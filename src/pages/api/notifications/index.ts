import { z } from 'zod';
import { route, json, notFound } from '../../../server/http';
import { getNotifyPrefs, setNotifyPrefs } from '../../../server/notify';

/** "My notifications": which e-mails this person receives in the current distillery. Every member may read and set their own. */
export const GET = route({ auth: 'board.read' }, async ({ ctx }) => {
  const mine = await getNotifyPrefs(ctx);
  if (!mine) throw notFound();
  return json({ prefs: mine.prefs, kinds: mine.kinds.map((k) => ({ kind: k.kind, label: k.label, hint: k.hint })) });
});

const prefsSchema = z
  .object({
    ferment_trouble: z.boolean().optional(),
    run_early: z.boolean().optional(),
    run_changes: z.boolean().optional(),
    digest: z.boolean().optional(),
  })
  .strict();

export const PUT = route({ auth: 'board.read', body: prefsSchema }, async ({ ctx, body }) => {
  const prefs = await setNotifyPrefs(ctx, body);
  return json({ prefs });
});
