import { z } from 'zod';
import { route, json } from '../../../server/http';
import { canonicalTimeZone, requestSignUp } from '../../../server/accounts';
import { NUMBER_FORMATS, UNIT_SYSTEMS } from '../../../lib/vocabulary';
import { clientIp } from '../../../server/request';
import { takeAttempt } from '../../../server/throttle';

/** No password here: it is chosen on the page the confirmation link opens, by the address's owner. */
const Body = z.object({
  workspaceName: z.string().trim().min(2, 'Enter the distillery name.').max(120),
  name: z.string().trim().min(1, 'Enter your name.').max(120),
  email: z.string().trim().max(254).email('Enter a valid e-mail.'),
  password: z.undefined({ error: 'Choose your password on the page the confirmation link opens, not here.' }).optional(),
  // How the distillery sees time, volumes and numbers; each falls back to the default when left out.
  timeZone: z
    .string({ error: 'Choose a time zone from the list.' })
    .trim()
    .max(64, 'Choose a time zone from the list.')
    .transform((tz, ctx) => {
      const zone = canonicalTimeZone(tz);
      if (!zone) ctx.addIssue({ code: 'custom', message: 'Choose a time zone from the list.' });
      return zone ?? z.NEVER;
    })
    .optional(),
  units: z.enum(UNIT_SYSTEMS, 'Choose metric or US units.').optional(),
  numberFormat: z.enum(NUMBER_FORMATS, 'Choose how numbers are written: decimal point or decimal comma.').optional(),
});

/** Always the same answer, so it never reveals whether the address already has an account. */
export const POST = route({ auth: 'public', body: Body }, async ({ req, body }) => {
  const ip = clientIp(req);
  // Each sign-up mails an address anyone may type: a few per address and per e-mail an hour.
  await takeAttempt('sign_up', [`email:${body.email.trim().toLowerCase()}`, `ip:${ip}`]);
  await requestSignUp({ ...body, ip });
  return json(
    { ok: true, message: `Check ${body.email.trim().toLowerCase()} for a link to confirm your address; you choose your password on the page it opens.` },
    202,
  );
});
