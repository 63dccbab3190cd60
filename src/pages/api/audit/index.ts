import { z } from 'zod';
import { route, json } from '../../../server/http';
import { listAudit } from '../../../server/members';

export const AuditQuery = z.object({
  action: z.string().max(60).optional(),
  userId: z.coerce.number().int().positive().optional(),
  from: z.iso.date('Use a date like 2025-03-01.').optional(),
  to: z.iso.date('Use a date like 2025-03-31.').optional(),
  page: z.coerce.number().int().min(1).max(10000).optional(),
});

/** Dates are whole UTC days; `to` is inclusive. */
export const GET = route({ auth: 'audit.read', query: AuditQuery }, async ({ ctx, query }) => {
  const r = await listAudit(ctx, {
    action: query.action || undefined,
    userId: query.userId,
    page: query.page,
    from: query.from ? new Date(`${query.from}T00:00:00Z`) : undefined,
    to: query.to ? new Date(new Date(`${query.to}T00:00:00Z`).getTime() + 86400_000) : undefined,
  });
  return json(r);
});
