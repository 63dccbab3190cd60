/**
 * Numbers as people type them never become a different number silently. JSON numbers stay
 * numbers; a string where a number is expected is read only in plain form ("1200", "1200.5"),
 * and "1,200" or "1.200,5" are refused with a 400 naming the field and saying what the number
 * probably was. A comma-format distillery sees and types its numbers with a decimal comma
 * (its islands read them and send plain numbers). How en-GB and de-DE write numbers: CLDR, as
 * Intl.NumberFormat prints them (1,200.5 and 1.200,5).
 */
import { describe, it, expect, beforeAll } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { createTestWorkspace, type Client, type TestWorkspace } from '../helpers/api';

const form = (fields: Record<string, string>) => new URLSearchParams(fields).toString();
const FORM = { 'content-type': 'application/x-www-form-urlencoded' };

describe('typed numbers at the API', () => {
  let ws: TestWorkspace;
  let manager: Client;
  let washTypeId: number;

  beforeAll(async () => {
    ws = await createTestWorkspace('Numbers');
    manager = await ws.client('manager');
    const wt = await manager.post('/api/wash-types', { name: 'Grain', category: 'grain', terminalMin: 1.002, terminalMax: 1.008 });
    expect(wt.status, wt.text).toBe(201);
    washTypeId = wt.json.washType.id;
  });

  it('refuses "1,200" sent as a string for a capacity with a "did you mean 1200?", never a 1.2 L fermenter', async () => {
    const r = await manager.post('/api/fermenters', { name: 'FV-str', capacity: '1,200' });
    expect(r.status, r.text).toBe(400);
    expect(r.json.error.code).toBe('invalid');
    expect(r.json.error.fields.capacity).toMatch(/^1,200 — did you mean 1200\?/);
    const rows = await getDb()
      .select()
      .from(t.fermenters)
      .where(and(eq(t.fermenters.workspaceId, ws.workspaceId), eq(t.fermenters.name, 'FV-str')));
    expect(rows).toHaveLength(0);
  });

  it.each([
    ['/api/fermenters', () => ({ name: 'FV-x', capacity: '1.200,5' }), 'capacity', /did you mean 1200\.5\?/],
    ['/api/fermenters', () => ({ name: 'FV-y', capacity: '1 200' }), 'capacity', /did you mean 1200\?/],
    ['/api/wash-types', () => ({ name: 'W', category: 'grain', terminalMin: '1,002', terminalMax: 1.008 }), 'terminalMin', /did you mean 1\.002\?/],
    [
      '/api/stills',
      () => ({
        name: 'S',
        kind: 'pot',
        capacityLitres: '2.000,5',
        heatingKw: 50,
        operatingHours: [],
        cleaningAfterRunMinutes: 60,
        typicalMinutes: { stripping: 300, spirit: 480, redistillation: 420, cleaning: 120, maintenance: 240 },
      }),
      'capacityLitres',
      /did you mean 2000\.5\?/,
    ],
  ])('POST %s refuses a locale-formatted string, naming the field', async (path, body, field, message) => {
    const r = await manager.post(path, body());
    expect(r.status, r.text).toBe(400);
    expect(r.json.error.fields[field]).toMatch(message);
  });

  it('refuses locale-formatted strings for a ferment volume and OG, and a reading value', async () => {
    const f = await manager.post('/api/ferments', {
      code: 'N-1',
      washTypeId,
      fermenterId: null,
      volume: '2.000',
      pitchedAt: '2025-03-01T08:00:00Z',
      og: '1,060',
    });
    expect(f.status, f.text).toBe(400);
    // "2.000" is 2 to a point reader and 2000 to a comma reader: where thousands can occur it is refused as ambiguous.
    expect(f.json.error.fields.volume).toBe('2.000 could be 2 or 2000: send it without the point, or as a JSON number.');
    expect(f.json.error.fields.og).toMatch(/^1,060 — did you mean 1\.06\?/);
    const ok = await manager.post('/api/ferments', { code: 'N-1', washTypeId, fermenterId: null, volume: 2000, pitchedAt: '2025-03-01T08:00:00Z', og: 1.06 });
    expect(ok.status, ok.text).toBe(201);
    const r = await manager.post(`/api/ferments/${ok.json.ferment.id}/readings`, {
      value: '1,050',
      unit: 'sg',
      method: 'digital',
      takenAt: '2025-03-02T08:00:00Z',
    });
    expect(r.status, r.text).toBe(400);
    expect(r.json.error.fields.value).toMatch(/^1,050 — did you mean 1\.05\?/);
  });

  it('keeps JSON numbers as they are and reads plain strings', async () => {
    const a = await manager.post('/api/fermenters', { name: 'FV-num', capacity: 1200 });
    expect(a.status, a.text).toBe(201);
    expect(a.json.fermenter.capacityLitres).toBe(1200);
    const b = await manager.post('/api/fermenters', { name: 'FV-plain', capacity: '1200.5' });
    expect(b.status, b.text).toBe(201);
    expect(b.json.fermenter.capacityLitres).toBe(1200.5);
    const c = await manager.patch(`/api/fermenters/${b.json.fermenter.id}`, { capacity: '1,5' });
    expect(c.status).toBe(400);
    expect(c.json.error.fields.capacity).toMatch(/did you mean 1\.5\?/);
  });

  it('reads a form post the same way: plain numbers pass, grouped ones are refused', async () => {
    const ok = await manager.request('POST', '/api/fermenters', form({ name: 'FV-form', capacity: '1500' }), FORM);
    expect(ok.status, ok.text).toBe(201);
    expect(ok.json.fermenter.capacityLitres).toBe(1500);
    const bad = await manager.request('POST', '/api/fermenters', form({ name: 'FV-form2', capacity: '1,500' }), FORM);
    expect(bad.status, bad.text).toBe(400);
    expect(bad.json.error.fields.capacity).toMatch(/^1,500 — did you mean 1500\?/);
    const ambiguous = await manager.request('POST', '/api/fermenters', form({ name: 'FV-form3', capacity: '1.500' }), FORM);
    expect(ambiguous.status, ambiguous.text).toBe(400);
    expect(ambiguous.json.error.fields.capacity).toMatch(/could be 1\.5 or 1500/);
  });
});

describe('a comma-format distillery', () => {
  it('shows its numbers with a decimal comma in the forms it types into, and tells its islands the format', async () => {
    const ws = await createTestWorkspace('Komma', { numberFormat: 'comma' });
    const manager = await ws.client('manager');
    const fv = await manager.post('/api/fermenters', { name: 'G1', capacity: 1200.5 });
    expect(fv.status, fv.text).toBe(201);
    const page = await manager.get('/vessels', { accept: 'text/html' });
    expect(page.status).toBe(200);
    // The capacity input holds 1200,5 (de-DE writes 1.200,5; inputs are written without grouping so they read back exactly).
    expect(page.text).toMatch(/id="fv-\d+-cap"[^>]*value="1200,5"|value="1200,5"[^>]*id="fv-\d+-cap"/);
    expect(page.text).toContain('&quot;numberFormat&quot;:[0,&quot;comma&quot;]');
    const settings = await manager.get('/settings', { accept: 'text/html' });
    expect(settings.status).toBe(200);
    expect(settings.text).toMatch(/data-number-format="comma"/);
    // Stable tolerance 0.001 SG is written 0,001; the wort correction factor 1.04 as 1,04.
    expect(settings.text).toMatch(/name="stableTolerance"[^>]*value="0,001"/);
    expect(settings.text).toMatch(/name="wortCorrectionFactor"[^>]*value="1,04"/);
  });
});
