/**
 * The last-manager rule under concurrency: two managers are demoted at the same moment and
 * exactly one demotion may go through, so the distillery always keeps a manager. On one
 * MariaDB this holds through row locks; tests/cluster/cluster.test.ts checks the same across
 * Galera nodes.
 */
import { describe, it, expect } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { createTestWorkspace } from '../helpers/api';

const ROUNDS = 8;

const managersOf = async (workspaceId: number) =>
  (
    await getDb()
      .select({ userId: t.memberships.userId })
      .from(t.memberships)
      .where(and(eq(t.memberships.workspaceId, workspaceId), eq(t.memberships.role, 'manager')))
  ).map((r) => r.userId);

describe('last manager under concurrent changes', () => {
  it(`lets exactly one of two simultaneous demotions of the two managers succeed (${ROUNDS} rounds)`, async () => {
    const ws = await createTestWorkspace('Two managers');
    const first = await ws.client('manager');
    expect((await first.patch(`/api/members/${ws.users.planner.id}`, { role: 'manager' })).status).toBe(200);
    const second = await ws.client('planner'); // now a manager
    const a = ws.users.manager.id;
    const b = ws.users.planner.id;
    const seen: number[] = [];

    for (let round = 0; round < ROUNDS; round++) {
      // Each manager demotes the other, at the same moment.
      const [r1, r2] = await Promise.all([first.patch(`/api/members/${b}`, { role: 'distiller' }), second.patch(`/api/members/${a}`, { role: 'distiller' })]);
      const statuses = [r1.status, r2.status];
      seen.push(...statuses);
      expect(
        statuses.filter((s) => s === 200),
        JSON.stringify([r1.json, r2.json]),
      ).toHaveLength(1);
      // The other is refused: 409 when it passed the role gate before the winner committed,
      // 403 when its manager had already been demoted by then. Never a 500.
      const loser = r1.status === 200 ? r2 : r1;
      expect([403, 409]).toContain(loser.status);
      if (loser.status === 409) expect(loser.json.error.message).toMatch(/at least one manager/);
      const left = await managersOf(ws.workspaceId);
      expect(left).toHaveLength(1);

      // The remaining manager restores the other for the next round.
      const winner = r1.status === 200 ? first : second;
      const demoted = r1.status === 200 ? b : a;
      expect((await winner.patch(`/api/members/${demoted}`, { role: 'manager' })).status).toBe(200);
    }
    console.log('[members concurrency] loser statuses', JSON.stringify(seen.filter((s) => s !== 200)));
  });

  it('lets exactly one of two simultaneous removals of the two managers succeed', async () => {
    const ws = await createTestWorkspace('Two managers leaving');
    const first = await ws.client('manager');
    expect((await first.patch(`/api/members/${ws.users.planner.id}`, { role: 'manager' })).status).toBe(200);
    const second = await ws.client('planner');
    const [r1, r2] = await Promise.all([first.del(`/api/members/${ws.users.planner.id}`), second.del(`/api/members/${ws.users.manager.id}`)]);
    expect([r1.status, r2.status].filter((s) => s === 200)).toHaveLength(1);
    expect([r1.status, r2.status].filter((s) => s !== 200).every((s) => s === 401 || s === 403 || s === 409)).toBe(true);
    expect(await managersOf(ws.workspaceId)).toHaveLength(1);
  });
});
