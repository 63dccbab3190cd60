import { route, json } from '../../../server/http';
import { listMembers, listPendingInvitations } from '../../../server/members';

export const GET = route({ action: 'members.manage' }, async ({ auth }) => {
  const [members, invitations] = await Promise.all([listMembers(auth.workspaceId), listPendingInvitations(auth.workspaceId)]);
  return json({ members, invitations });
});
