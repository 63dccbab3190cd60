import { z } from 'zod';
import { publicRoute, json } from '../../../server/http';
import { requestSignUp, MIN_PASSWORD } from '../../../server/accounts';
import { clientIp } from '../../../server/request';

const Body = z.object({
  workspaceName: z.string().trim().min(2, 'Enter the distillery name.').max(120),
  name: z.string().trim().min(1, 'Enter your name.').max(120),
  email: z.string().trim().max(254).email('Enter a valid e-mail.'),
  password: z.string().min(MIN_PASSWORD, `Use at least ${MIN_PASSWORD} characters.`).max(1000),
});

/** Always the same answer, so it never reveals whether the address already has an account. */
export const POST = publicRoute({ body: Body }, async ({ ctx, body }) => {
  await requestSignUp({ ...body, ip: clientIp(ctx) });
  return json({ ok: true, message: `Check ${body.email.trim().toLowerCase()} for a link to confirm your address.` }, 202);
});
