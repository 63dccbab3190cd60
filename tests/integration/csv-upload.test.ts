import { describe, it, expect, beforeAll } from 'vitest';
import { readFileSync } from 'node:fs';
import { and, eq, isNull } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { createTestWorkspace, BASE, type Client } from '../helpers/api';

const fixture = (name: string) => readFileSync(`tests/fixtures/upload/${name}`, 'utf8');
const PITCH = '2025-03-01T08:00:00Z';

async function setup() {
  const ws = await createTestWorkspace('CSV upload');
  const manager = await ws.client('manager');
  const wt = await manager.post('/api/wash-types', { name: 'Grain', category: 'grain', terminalMin: 1.002, terminalMax: 1.008 });
  const planner = await ws.client('planner');
  const mk = async (code: string) => {
    const f = await planner.post('/api/ferments', { code, washTypeId: wt.json.washType.id, fermenterId: null, volume: 2000, pitchedAt: PITCH, og: 1.06 });
    expect(f.status, f.text).toBe(201);
    return f.json.ferment.id as number;
  };
  return { ws, planner, mk };
}

const upload = (c: Client, fermentId: number, body: string | FormData, headers: Record<string, string> = { 'content-type': 'text/csv' }) =>
  c.request('POST', `/api/ferments/${fermentId}/uploads`, body, headers);

async function count(workspaceId: number, fermentId: number) {
  return (
    await getDb()
      .select({ id: t.readings.id })
      .from(t.readings)
      .where(and(eq(t.readings.workspaceId, workspaceId), eq(t.readings.fermentId, fermentId), isNull(t.readings.deletedAt)))
  ).length;
}

describe('logger CSV upload', () => {
  let s: Awaited<ReturnType<typeof setup>>;
  beforeAll(async () => {
    s = await setup();
  });

  it('previews, flags duplicates of existing readings, then imports in one go', async () => {
    const id = await s.mk('CSV-1');
    const d = await s.ws.client('distiller');
    // An existing manual reading at the same time as line 3 of the file.
    const m = await d.post(`/api/ferments/${id}/readings`, { value: 1.046, unit: 'sg', method: 'hydrometer', sampleTemp: 20, takenAt: '2025-03-02T08:00:00Z' });
    expect(m.status).toBe(201);
    const r = await upload(s.planner, id, fixture('good.csv'));
    expect(r.status, r.text).toBe(201);
    const p = r.json.preview;
    expect(p.uploadId).toMatch(/^[A-Za-z0-9_-]{32}$/);
    expect(p.counts).toEqual({ accepted: 5, rejected: 0, duplicates: 1, toImport: 4, held: 0 });
    expect(p.accepted.find((x: any) => x.line === 3).duplicate).toBe(true);
    expect(p.accepted.find((x: any) => x.line === 6).lowConfidence).toBe(true);
    expect(await count(s.ws.workspaceId, id)).toBe(1); // staged, nothing imported yet
    const c = await s.planner.post(`/api/ferments/${id}/uploads/${p.uploadId}/commit`);
    expect(c.status, c.text).toBe(200);
    expect(c.json.imported).toBe(4);
    expect(await count(s.ws.workspaceId, id)).toBe(5);
    const rows = await getDb()
      .select()
      .from(t.readings)
      .where(and(eq(t.readings.fermentId, id), eq(t.readings.source, 'upload')));
    expect(rows.every((x) => x.uploadId === p.uploadId)).toBe(true);
    // A second commit of the same preview imports nothing more.
    expect((await s.planner.post(`/api/ferments/${id}/uploads/${p.uploadId}/commit`)).status).toBe(409);
    expect(await count(s.ws.workspaceId, id)).toBe(5);
    // Uploading the same file again: every line is a duplicate now.
    const again = await upload(s.planner, id, fixture('good.csv'));
    expect(again.json.preview.counts.duplicates).toBe(5);
    expect(again.json.preview.counts.toImport).toBe(0);
  });

  it('accepts a UTF-8 BOM with semicolons and decimal commas, sent as multipart', async () => {
    const id = await s.mk('CSV-2');
    const form = new FormData();
    form.append('file', new Blob([readFileSync('tests/fixtures/upload/bom-semicolon.csv')], { type: 'text/csv' }), '../../etc/passwd.csv');
    const r = await upload(s.planner, id, form, {});
    expect(r.status, r.text).toBe(201);
    expect(r.json.preview.counts.accepted).toBe(2);
    expect(r.json.preview.accepted[0].value).toBe(1.058);
    expect(r.json.preview.uploadId).not.toContain('passwd');
  });

  it.each([
    ['a wrong delimiter (tabs)', 'tab-delimited.csv', 422, /lacks the required column/],
    ['missing columns', 'missing-column.csv', 422, /"value"/],
  ])('refuses a file with %s, imports nothing', async (_n, file, status, message) => {
    const id = await s.mk(`CSV-F-${file.slice(0, 6)}`);
    const r = await upload(s.planner, id, fixture(file));
    expect(r.status).toBe(status);
    expect(r.json.error.message).toMatch(message);
    expect(r.json.error.message).toMatch(/Nothing was imported/);
    expect(await count(s.ws.workspaceId, id)).toBe(0);
    expect((await getDb().select().from(t.readingUploads).where(eq(t.readingUploads.fermentId, id))).length).toBe(0);
  });

  it.each([
    ['bad dates', 'bad-dates.csv', [3, 4], /ISO 8601|not a valid date/],
    ['absurd values', 'absurd-values.csv', [2, 3, 4], /outside/],
    ['formula-like text cells', 'formula.csv', [2, 3], /not a number/],
    ['times before pitching or in the future', 'outside-ferment.csv', [2, 3], /before the ferment was pitched|in the future/],
  ])('lists lines with %s by line number and reason', async (_n, file, lines, reason) => {
    const id = await s.mk(`CSV-R-${file.slice(0, 8)}`);
    const r = await upload(s.planner, id, fixture(file));
    expect(r.status, r.text).toBe(201);
    const rejected = r.json.preview.rejected as Array<{ line: number; reason: string }>;
    expect(rejected.map((x) => x.line)).toEqual(lines);
    for (const x of rejected) expect(x.reason).toMatch(reason);
    expect(r.json.preview.counts.toImport).toBe(r.json.preview.counts.accepted);
    expect(await count(s.ws.workspaceId, id)).toBe(0);
  });

  it('refuses 50,001 rows with a clear message and stores nothing', async () => {
    const id = await s.mk('CSV-BIG-ROWS');
    const start = Date.parse('2025-03-01T09:00:00Z');
    const lines = ['time,value'];
    for (let i = 0; i < 50_001; i++) lines.push(`${new Date(start + i * 1000).toISOString()},1.050`);
    const r = await upload(s.planner, id, lines.join('\n'));
    expect(r.status).toBe(413);
    expect(r.json.error.message).toMatch(/more than 50000 readings/);
    expect(await count(s.ws.workspaceId, id)).toBe(0);
  });

  it('refuses 6 MB by its Content-Length and by counting a streamed body', async () => {
    const id = await s.mk('CSV-BIG-BYTES');
    const big = 'time,value\n' + '2025-03-01T09:00:00Z,1.050\n'.repeat(Math.ceil((6 * 1024 * 1024) / 27));
    const r = await upload(s.planner, id, big);
    expect(r.status).toBe(413);
    expect(r.json.error.message).toMatch(/larger than 5 MB/);
    // Chunked, without a Content-Length: the server counts bytes as they arrive.
    const c = s.planner;
    const stream = new ReadableStream<Uint8Array>({
      start(ctrl) {
        const chunk = new TextEncoder().encode('2025-03-01T09:00:00Z,1.050\n'.repeat(40_000));
        for (let i = 0; i < 6; i++) ctrl.enqueue(chunk);
        ctrl.close();
      },
    });
    const res = await fetch(`${BASE()}/api/ferments/${id}/uploads`, {
      method: 'POST',
      body: stream,
      headers: { origin: BASE(), cookie: c.cookie, 'content-type': 'text/csv' },
      duplex: 'half',
    } as RequestInit & { duplex: 'half' });
    expect(res.status).toBe(413);
    expect(await count(s.ws.workspaceId, id)).toBe(0);
  });

  it('commits all or nothing: a staged row that no longer passes imports nothing', async () => {
    const id = await s.mk('CSV-ATOMIC');
    const r = await upload(s.planner, id, fixture('good.csv'));
    expect(r.json.preview.counts.toImport).toBe(5);
    // Move the pitch later than the file's first rows: they would now be before pitching.
    await getDb()
      .update(t.ferments)
      .set({ pitchedAt: new Date('2025-03-02T12:00:00Z') })
      .where(eq(t.ferments.id, id));
    const c = await s.planner.post(`/api/ferments/${id}/uploads/${r.json.preview.uploadId}/commit`);
    expect(c.status).toBe(409);
    expect(c.json.error.message).toMatch(/Nothing was imported/);
    expect(await count(s.ws.workspaceId, id)).toBe(0);
  });

  it('keeps uploads to their workspace and role', async () => {
    const id = await s.mk('CSV-AUTHZ');
    const r = await upload(s.planner, id, fixture('good.csv'));
    const other = await createTestWorkspace('Other');
    const stranger = await other.client('manager');
    expect((await upload(stranger, id, fixture('good.csv'))).status).toBe(404);
    expect((await stranger.post(`/api/ferments/${id}/uploads/${r.json.preview.uploadId}/commit`)).status).toBe(404);
    expect((await upload(await s.ws.client('staff'), id, fixture('good.csv'))).status).toBe(403);
    expect(await count(s.ws.workspaceId, id)).toBe(0);
  });
});
