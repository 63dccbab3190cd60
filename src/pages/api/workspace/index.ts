import { z } from 'zod';
import { route, json } from '../../../server/http';
import { updateWorkspaceSettings, deleteWorkspace } from '../../../server/members';
import { clearSessionCookie } from '../../../server/auth/session';
import { FERMENTER_RELEASE_MOMENTS, NUMBER_FORMATS, UNIT_SYSTEMS } from '../../../lib/vocabulary';

function validZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat('en', { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

export const SettingsBody = z.object({
  name: z.string().trim().min(2, 'Enter the distillery name.').max(120),
  timeZone: z.string().trim().max(64).refine(validZone, 'Choose a time zone from the list.'),
  units: z.enum(UNIT_SYSTEMS, 'Choose metric or US units.'),
  calibrationTempC: z.coerce.number().refine((v) => v === 20 || v === 15.56, 'Hydrometers are calibrated at 20 °C or 15.56 °C (60 °F).'),
  stableDays: z.coerce.number().int('Whole days only.').min(1, 'At least 1 day.').max(14, 'At most 14 days.'),
  stableTolerance: z.coerce.number().min(0.0005, 'At least 0.0005 SG.').max(0.01, 'At most 0.010 SG.'),
  wortCorrectionFactor: z.coerce.number().min(0.9, 'Between 0.90 and 1.20.').max(1.2, 'Between 0.90 and 1.20.'),
  numberFormat: z.enum(NUMBER_FORMATS, 'Choose how numbers are written: decimal point or decimal comma.').optional(),
  atRiskThreshold: z.coerce.number().min(0.5, 'Between 50 % and 95 %.').max(0.95, 'Between 50 % and 95 %.').optional(),
  startEarlyMarginMinutes: z.coerce
    .number()
    .int('Whole minutes only.')
    .min(0, 'At least 0 minutes.')
    .max(24 * 60, 'At most 24 hours (1440 minutes).')
    .optional(),
  releaseFermentersOn: z.enum(FERMENTER_RELEASE_MOMENTS, 'Choose when a stripping run frees its fermenters.').optional(),
  bookingHorizonDays: z.coerce
    .number()
    .int('Whole days only.')
    .min(7, 'At least 7 days.')
    .max(3 * 366, 'At most three years (1098 days).')
    .optional(),
});

/** The workspace's settings, as the session read them for this request. */
export const GET = route({ auth: 'board.read' }, async ({ ctx }) => json({ workspace: ctx.ws }));

export const PATCH = route({ auth: 'settings.manage', body: SettingsBody }, async ({ ctx, body }) => {
  await updateWorkspaceSettings(ctx, body);
  return json({ ok: true, message: 'Settings saved.' });
});

/** Deletes the distillery and all its data; the name must be typed exactly. */
export const DELETE = route({ auth: 'settings.manage', body: z.object({ confirmName: z.string().max(200) }) }, async ({ req, ctx, body }) => {
  await deleteWorkspace(ctx, body.confirmName);
  const others = req.locals.memberships.filter((m) => m.workspaceId !== ctx.ws.id);
  if (!others.length) clearSessionCookie(req.cookies);
  return json({ ok: true, message: 'The distillery and all its data are deleted.', redirect: others.length ? '/' : '/sign-in' });
});
