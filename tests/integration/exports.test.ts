/**
 * Exports: CSV quoted per RFC 4180 and safe against formula injection (OWASP CSV injection:
 * text cells beginning with = + - @ TAB or CR get a leading single quote); a round trip through
 * papaparse gives back the same values; downloads are attachments with generated file names;
 * the manager's full export holds the workspace's rows and no password or token hashes.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { createTestWorkspace, type Client, type TestWorkspace } from '../helpers/api';
import { utc } from '../helpers/time';

let ws: TestWorkspace;
let manager: Client;
let planner: Client;
const NASTY_NOTES = 'Sweet, "clean" nose;\nsecond line';

beforeAll(async () => {
  ws = await createTestWorkspace('Exports', { timeZone: 'Europe/London' });
  const db = getDb();
  const w = ws.workspaceId;
  const [still] = await db
    .insert(t.stills)
    .values({
      workspaceId: w,
      name: '=Still "A", copper',
      kind: 'pot',
      capacityLitres: 1000,
      heatingKw: 30,
      operatingHours: [1, 2, 3, 4, 5].map((weekday) => ({ weekday, open: '08:00', close: '18:00' })),
      typicalMinutes: {},
    })
    .$returningId();
  const [wt] = await db
    .insert(t.washTypes)
    .values({ workspaceId: w, name: '@grain', category: 'grain', terminalMin: 1.002, terminalMax: 1.008 })
    .$returningId();
  const [f] = await db
    .insert(t.ferments)
    .values({
      workspaceId: w,
      code: '+EX-1',
      washTypeId: wt!.id,
      volumeLitres: 900,
      pitchedAt: utc('2025-03-03T09:00'),
      og: 1.06,
      yeast: '-cmd|calc',
      notes: NASTY_NOTES,
    })
    .$returningId();
  await db.insert(t.readings).values([
    {
      workspaceId: w,
      fermentId: f!.id,
      takenAt: utc('2025-03-04T09:00'),
      method: 'hydrometer',
      rawValue: 1.03,
      rawUnit: 'sg',
      sampleTempC: 20,
      correctedSg: 1.03,
      note: '=HYPERLINK("http://x.example","y")',
    },
    {
      workspaceId: w,
      fermentId: f!.id,
      takenAt: utc('2025-03-05T09:00'),
      method: 'hydrometer',
      rawValue: 1.012,
      rawUnit: 'sg',
      sampleTempC: 21.5,
      correctedSg: 1.0123,
      note: '\tTAB first',
    },
  ]);
  const [run] = await db
    .insert(t.runs)
    .values({
      workspaceId: w,
      stillId: still!.id,
      type: 'stripping',
      status: 'done',
      startsAt: utc('2025-03-06T08:00'),
      endsAt: utc('2025-03-06T14:00'),
      chargeLitres: 900,
      chargeAbv: 7,
      notes: '-2+3',
    })
    .$returningId();
  await db.insert(t.runFerments).values({ runId: run!.id, fermentId: f!.id, workspaceId: w, litres: 900 });
  await db.insert(t.runOutcomes).values({
    workspaceId: w,
    runId: run!.id,
    fraction: 'low_wines',
    volumeLitres: 220,
    alcoholmeterReading: 27,
    readingTempC: 20,
    abv20: 27,
    laa: 59.4,
    cutNote: '@SUM(A1:A2)',
  });
  manager = await ws.client('manager');
  planner = await ws.client('planner');
});

function parse(text: string): Array<Record<string, string>> {
  const out = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });
  expect(out.errors).toEqual([]);
  return out.data;
}

describe('CSV exports', () => {
  it('ferments with readings: attachment, neutralised formula cells, RFC 4180 round trip', async () => {
    const r = await planner.get('/api/exports/ferments?from=2025-03-01&to=2025-03-31');
    expect(r.status, r.text).toBe(200);
    expect(r.headers.get('content-type')).toMatch(/^text\/csv/);
    expect(r.headers.get('content-disposition')).toBe('attachment; filename="plateau-ferments-readings-2025-03-01-to-2025-03-31.csv"');
    expect(r.text.includes('\r\n')).toBe(true);
    const rows = parse(r.text);
    expect(rows).toHaveLength(2);
    // Cells beginning with = + - @ TAB get a leading quote (OWASP CSV injection guidance).
    expect(rows[0]!.ferment_code).toBe("'+EX-1");
    expect(rows[0]!.wash_type).toBe("'@grain");
    expect(rows[0]!.yeast).toBe("'-cmd|calc");
    expect(rows[0]!.reading_note).toBe('\'=HYPERLINK("http://x.example","y")');
    expect(rows[1]!.reading_note).toBe("'\tTAB first");
    // Quotes, commas and a line break survive the round trip unchanged.
    expect(rows[0]!.ferment_notes).toBe(NASTY_NOTES);
    // Numbers stay numbers (a negative number is not text and is not quoted away).
    expect(Number(rows[1]!.corrected_sg)).toBe(1.0123);
    expect(Number(rows[1]!.sample_temp_c)).toBe(21.5);
    expect(rows[0]!.pitched_at_utc).toBe('2025-03-03T09:00:00.000Z');
  });

  it('runs with outcomes: one row per fraction with LAA and recovery', async () => {
    const r = await planner.get('/api/exports/runs?from=2025-03-01&to=2025-03-31');
    expect(r.status, r.text).toBe(200);
    expect(r.headers.get('content-disposition')).toMatch(/^attachment; filename="plateau-runs-outcomes-2025-03-01-to-2025-03-31\.csv"$/);
    const rows = parse(r.text);
    expect(rows).toHaveLength(1);
    expect(rows[0]!.still).toBe('\'=Still "A", copper');
    expect(rows[0]!.run_notes).toBe("'-2+3");
    expect(rows[0]!.cut_note).toBe("'@SUM(A1:A2)");
    expect(rows[0]!.ferments).toBe("'+EX-1 900 L");
    expect(rows[0]!.fraction).toBe('Low wines');
    // 900 L × 7 % = 63 LAA charged; 59.4 collected; 59.4 / 63 = 0.942857 -> 0.9429
    expect(Number(rows[0]!.charged_laa)).toBe(63);
    expect(Number(rows[0]!.laa)).toBe(59.4);
    expect(Number(rows[0]!.run_recovery)).toBe(0.9429);
  });

  it('utilisation per still and week', async () => {
    const r = await manager.get('/api/exports/utilisation?from=2025-03-03&to=2025-03-09');
    expect(r.status, r.text).toBe(200);
    const rows = parse(r.text);
    // Mon–Fri 08–18 = 50 h open; the 6 h run on Thursday = 6 h booked and done; 6 / 50 = 0.12
    expect(rows).toEqual([
      {
        still: '\'=Still "A", copper',
        iso_week: '2025-W10',
        available_hours: '50',
        booked_hours: '6',
        done_hours: '6',
        idle_waiting_hours: '0',
        utilisation: '0.12',
      },
    ]);
  });

  it('staff and distillers cannot export (403)', async () => {
    for (const role of ['staff', 'distiller'] as const) {
      const c = await ws.client(role);
      expect((await c.get('/api/exports/runs?from=2025-03-01&to=2025-03-31')).status).toBe(403);
    }
  });
});

describe('full workspace export (managers)', () => {
  it('is one JSON document with the workspace rows and no password or token hashes', async () => {
    expect((await planner.get('/api/exports/workspace')).status).toBe(403);
    const r = await manager.get('/api/exports/workspace');
    expect(r.status).toBe(200);
    expect(r.headers.get('content-disposition')).toMatch(/^attachment; filename="plateau-workspace-export-\d{4}-\d{2}-\d{2}\.json"$/);
    const doc = r.json;
    expect(doc.format).toBe('plateau-workspace-export');
    expect(doc.workspace.id).toBe(ws.workspaceId);
    expect(doc.tables.ferments.map((f: any) => f.code)).toEqual(['+EX-1']);
    expect(doc.tables.readings).toHaveLength(2);
    expect(doc.tables.run_outcomes).toHaveLength(1);
    expect(doc.tables.members).toHaveLength(4);
    for (const table of Object.values(doc.tables) as any[][]) for (const row of table) expect(row.workspaceId ?? ws.workspaceId).toBe(ws.workspaceId);
    expect(r.text).not.toMatch(/passwordHash|password_hash|tokenHash|token_hash|\$argon2/);
  });
});
