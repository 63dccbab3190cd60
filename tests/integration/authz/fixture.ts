/**
 * The authorization fixture: two workspaces (A and B), each with one person per role, a still,
 * a closure, a fermenter, a wash type, a ferment with a reading, a run charged by it, a calendar
 * feed, a pending invitation and a live session of its manager. Inserted straight with getDb().
 */
import { eq } from 'drizzle-orm';
import { getDb } from '../../../src/db/client';
import * as t from '../../../src/db/schema';
import { newToken, hashToken } from '../../../src/server/auth/tokens';
import { createSession } from '../../../src/server/auth/session';
import { sessionHandle } from '../../../src/server/accounts';
import { createTestWorkspace } from '../../helpers/api';
import type { Fixture, WorkspaceIds } from './types';

async function buildWorkspace(label: string): Promise<WorkspaceIds> {
  const ws = await createTestWorkspace(`Authz ${label}`);
  const db = getDb();
  const workspaceId = ws.workspaceId;
  const [wsRow] = await db.select({ name: t.workspaces.name }).from(t.workspaces).where(eq(t.workspaces.id, workspaceId));
  const [still] = await db
    .insert(t.stills)
    .values({
      workspaceId,
      name: `Still ${label}`,
      kind: 'pot',
      capacityLitres: 1000,
      heatingKw: 30,
      operatingHours: [1, 2, 3, 4, 5].map((weekday) => ({ weekday, open: '06:00', close: '18:00' })),
      typicalMinutes: { stripping: 300, spirit: 480 },
    })
    .$returningId();
  const [closure] = await db
    .insert(t.stillClosures)
    .values({ workspaceId, stillId: still!.id, startsOn: '2031-01-06', endsOn: '2031-01-07', reason: 'Descaling' })
    .$returningId();
  const [fermenter] = await db
    .insert(t.fermenters)
    .values({ workspaceId, name: `FV ${label}`, capacityLitres: 1200 })
    .$returningId();
  const [washType] = await db
    .insert(t.washTypes)
    .values({ workspaceId, name: 'Malt wash', category: 'grain', terminalMin: 1.002, terminalMax: 1.008, typicalOg: 1.06 })
    .$returningId();
  const pitchedAt = new Date(Date.now() - 3 * 86400_000);
  const [ferment] = await db
    .insert(t.ferments)
    .values({
      workspaceId,
      code: `AZ-${label}-${Date.now() % 100000}`,
      washTypeId: washType!.id,
      fermenterId: fermenter!.id,
      volumeLitres: 1000,
      pitchedAt,
      og: 1.06,
      createdBy: ws.users.planner.id,
    })
    .$returningId();
  const [reading] = await db
    .insert(t.readings)
    .values({
      workspaceId,
      fermentId: ferment!.id,
      takenAt: new Date(pitchedAt.getTime() + 86400_000),
      method: 'hydrometer',
      rawValue: 1.03,
      rawUnit: 'sg',
      sampleTempC: 20,
      sampleTempUnit: 'C',
      correctedSg: 1.03,
      takenBy: ws.users.distiller.id,
    })
    .$returningId();
  const startsAt = new Date(Date.now() + 10 * 86400_000);
  const [run] = await db
    .insert(t.runs)
    .values({
      workspaceId,
      stillId: still!.id,
      type: 'stripping',
      startsAt,
      endsAt: new Date(startsAt.getTime() + 6 * 3600_000),
      chargeLitres: 900,
      createdBy: ws.users.planner.id,
    })
    .$returningId();
  await db.insert(t.runFerments).values({ runId: run!.id, fermentId: ferment!.id, workspaceId, litres: 900 });
  const feedToken = newToken();
  const [feed] = await db
    .insert(t.calendarFeeds)
    .values({ workspaceId, scope: 'workspace', name: 'Whole distillery', tokenHash: hashToken(feedToken), createdBy: ws.users.manager.id })
    .$returningId();
  const [invitation] = await db
    .insert(t.invitations)
    .values({
      workspaceId,
      email: `invitee-${workspaceId}@test.example`,
      role: 'staff',
      tokenHash: hashToken(newToken()),
      invitedBy: ws.users.manager.id,
      expiresAt: new Date(Date.now() + 7 * 86400_000),
    })
    .$returningId();
  const session = await createSession(ws.users.manager.id, workspaceId, 'authz fixture');
  return {
    workspaceId,
    workspaceName: wsRow!.name,
    users: ws.users,
    stillId: still!.id,
    closureId: closure!.id,
    fermenterId: fermenter!.id,
    washTypeId: washType!.id,
    fermentId: ferment!.id,
    readingId: reading!.id,
    runId: run!.id,
    feedId: feed!.id,
    feedToken,
    invitationId: invitation!.id,
    managerSessionHandle: sessionHandle(session.id),
  };
}

export async function buildFixture(): Promise<Fixture> {
  return { a: await buildWorkspace('A'), b: await buildWorkspace('B') };
}
