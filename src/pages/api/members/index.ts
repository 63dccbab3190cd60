import { route, json } from '../../../server/http';
import { listMembers, listPendingInvitations } from '../../../server/members';

export const GET = route({ auth: 'members.manage' }, async ({ ctx }) => {
  const [members, invitations] = await Promise.all([listMembers(ctx), listPendingInvitations(ctx)]);
  return json({ members, invitations });
});
