import { describe, it, expect, beforeAll } from 'vitest';
import type { Client } from '../helpers/api';
import { boardFixture, type BoardFixture } from '../helpers/board-fixture';

const hours = [1, 2, 3, 4, 5].map((weekday) => ({ weekday, open: '06:00', close: '22:00' }));
const typicalMinutes = { stripping: 300, spirit: 480, redistillation: 420, cleaning: 120, maintenance: 240 };
const still = { name: 'Gin Still', kind: 'pot', capacityLitres: 600, heatingKw: 24, operatingHours: hours, cleaningAfterRunMinutes: 45, typicalMinutes };

describe('stills API', () => {
  let fx: BoardFixture;
  let manager: Client;
  let planner: Client;
  beforeAll(async () => {
    fx = await boardFixture('Stills Test Distillery');
    [manager, planner] = await Promise.all([fx.client('manager'), fx.client('planner')]);
  });

  it('lets a manager add, edit, order and retire stills; others only read', async () => {
    const created = await manager.post('/api/stills', still);
    expect(created.status, created.text).toBe(201);
    const id = created.json.still.id;
    expect(created.json.still.position).toBe(3);
    expect((await planner.post('/api/stills', { ...still, name: 'Another' })).status).toBe(403);
    expect((await planner.patch(`/api/stills/${id}`, { heatingKw: 30 })).status).toBe(403);
    const edited = await manager.patch(`/api/stills/${id}`, { heatingKw: 30, cleaningAfterRunMinutes: 30, typicalMinutes: { ...typicalMinutes, spirit: 360 } });
    expect(edited.status).toBe(200);
    expect(edited.json.still.heatingKw).toBe(30);
    expect(edited.json.still.typicalMinutes.spirit).toBe(360);
    const order = await manager.put('/api/stills/order', { ids: [id, fx.stills.small, fx.stills.ws2, fx.stills.ws1] });
    expect(order.status).toBe(200);
    expect(order.json.stills.map((s: { id: number }) => s.id)).toEqual([id, fx.stills.small, fx.stills.ws2, fx.stills.ws1]);
    const listed = await planner.get('/api/stills');
    expect(listed.json.stills[0].name).toBe('Gin Still');
    const removed = await manager.del(`/api/stills/${id}`);
    expect(removed.json.removed).toBe('deleted');
  });

  it.each([
    ['a duplicate name', { name: 'Wash Still 1' }, 'name'],
    ['the same opening and closing time', { operatingHours: [{ weekday: 1, open: '06:00', close: '06:00' }] }, 'operatingHours.0.close'],
    ['zero capacity', { capacityLitres: 0 }, 'capacityLitres'],
    ['a bad time', { operatingHours: [{ weekday: 1, open: '6am', close: '18:00' }] }, 'operatingHours.0.open'],
  ])('refuses %s with 400 and the field', async (_what, over, field) => {
    const r = await manager.post('/api/stills', { ...still, name: 'Fresh', ...over });
    expect(r.status).toBe(400);
    expect(Object.keys(r.json.error.fields ?? {})).toContain(field);
  });

  it('accepts an overnight shift: a closing time before the opening time closes the next day', async () => {
    const r = await manager.post('/api/stills', { ...still, name: 'Night Shift Still', operatingHours: [{ weekday: 5, open: '22:00', close: '06:00' }] });
    expect(r.status, r.text).toBe(201);
    expect(r.json.still.operatingHours).toEqual([{ weekday: 5, open: '22:00', close: '06:00' }]);
    expect((await manager.del(`/api/stills/${r.json.still.id}`)).status).toBe(200);
  });

  it('records closures for one still or the whole distillery and shows them on the board', async () => {
    // Dates within the booking horizon (365 days by default): about three and six months ahead.
    const ymd = (days: number) => new Date(Date.now() + days * 86_400_000).toISOString().slice(0, 10);
    const [a1, a2, b1, b2] = [ymd(90), ymd(91), ymd(180), ymd(181)];
    const c1 = await manager.post('/api/stills/closures', { stillId: fx.stills.ws1, startsOn: a1, endsOn: a2, reason: 'Boiler service' });
    expect(c1.status, c1.text).toBe(201);
    // The distillery-wide closure overlaps the first one's window on the board.
    const c2 = await manager.post('/api/stills/closures', { stillId: null, startsOn: a2, endsOn: b2, reason: 'Distillery shutdown' });
    expect(c2.status).toBe(201);
    expect((await manager.post('/api/stills/closures', { stillId: null, startsOn: b2, endsOn: b1, reason: 'Backwards' })).status).toBe(400);
    expect((await planner.post('/api/stills/closures', { stillId: null, startsOn: b1, endsOn: b2, reason: 'x' })).status).toBe(403);
    const board = await planner.get(`/api/board?from=${encodeURIComponent(`${ymd(89)}T00:00:00Z`)}&to=${encodeURIComponent(`${ymd(96)}T00:00:00Z`)}`);
    const ws1 = board.json.stills.find((s: { id: number }) => s.id === fx.stills.ws1);
    const ws2 = board.json.stills.find((s: { id: number }) => s.id === fx.stills.ws2);
    expect(ws1.closures.map((c: { reason: string }) => c.reason).sort()).toEqual(['Boiler service', 'Distillery shutdown']);
    expect(ws2.closures.map((c: { reason: string }) => c.reason)).toEqual(['Distillery shutdown']);
    expect((await manager.del(`/api/stills/closures/${c1.json.closure.id}`)).status).toBe(204);
    const other = await boardFixture('Other Stills Distillery');
    const outsider = await other.client('manager');
    expect((await outsider.del(`/api/stills/closures/${c2.json.closure.id}`)).status).toBe(404);
    expect((await outsider.patch(`/api/stills/${fx.stills.ws1}`, { heatingKw: 1 })).status).toBe(404);
    expect((await outsider.post('/api/stills/closures', { stillId: fx.stills.ws1, startsOn: a1, endsOn: a1, reason: 'x' })).status).toBe(404);
  });
});
