import { route } from '../../../server/http';
import { attachment, fullExport, safeFileName } from '../../../server/exports';
import { audit } from '../../../server/audit';

/** Manager only: every row of the distillery's data as one JSON document (secrets left out; see server/exports.ts). */
export const GET = route({ auth: 'exports.full' }, async ({ ctx }) => {
  const now = new Date();
  const doc = await fullExport(ctx, now);
  await audit({ workspaceId: ctx.ws.id, userId: ctx.actor.userId, action: 'export.full', entityType: 'workspace', entityId: ctx.ws.id });
  const day = now.toISOString().slice(0, 10);
  return attachment(JSON.stringify(doc, null, 1), safeFileName(`workspace-export-${day}`, null, 'json'), 'application/json; charset=utf-8');
});
