import { randomBytes } from 'node:crypto';
import { and, eq, gt, isNull, lt } from 'drizzle-orm';
import { getDb } from '../db/client';
import { readingUploads, readings } from '../db/schema';
import { MAX_UPLOAD_BYTES, MAX_UPLOAD_ROWS, parseLoggerCsv, type LoggerRow } from '../lib/csv';
import { temperatureUnitFor } from '../lib/units';
import { audit } from './audit';
import { HttpError, conflict, notFound, readLimitedBytes } from './http';
import type { Ctx } from './context';
import { getFerment } from './ferment-lookup';
import { clockTime, deriveCorrected, DUPLICATE_WINDOW_MS, plausibilityBasis, readingDoubt, type PlausibilityBasis } from './readings';
import { recomputeForecast } from './forecasts';

/** A staged preview lives this long before it must be uploaded again. */
export const UPLOAD_TTL_MS = 60 * 60_000;
/** Multipart framing around the file: boundaries and part headers. */
const MULTIPART_OVERHEAD = 64 * 1024;
/** Rows echoed back in the preview (the counts cover all of them). */
const PREVIEW_ROWS = 200;
const PREVIEW_REJECTED = 500;

const mb = (n: number) => `${(n / 1024 / 1024).toFixed(0)} MB`;
const tooLarge = () =>
  new HttpError(
    413,
    'too_large',
    `The file is larger than ${mb(MAX_UPLOAD_BYTES)}. Split it into smaller files (at most ${MAX_UPLOAD_ROWS.toLocaleString('en-GB')} readings each).`,
  );

/**
 * Reads the upload without ever holding more than the limit: refuses at once on a declared
 * Content-Length over it, and counts bytes while streaming for bodies that do not declare one
 * (or lie). Accepts the file as the raw body or as the `file` field of multipart/form-data.
 */
export async function readUploadText(request: Request): Promise<string> {
  const type = request.headers.get('content-type') ?? '';
  const multipart = type.toLowerCase().startsWith('multipart/form-data');
  const limit = MAX_UPLOAD_BYTES + (multipart ? MULTIPART_OVERHEAD : 0);
  if (!request.body) throw new HttpError(400, 'invalid', 'Send the CSV file as the request body.', { file: 'No file was sent.' });
  const bytes = await readLimitedBytes(request, limit);
  if (bytes === null) throw tooLarge();
  if (!multipart) return bytes.toString('utf8');
  let form: FormData;
  try {
    form = await new Response(new Uint8Array(bytes), { headers: { 'content-type': type } }).formData();
  } catch {
    throw new HttpError(400, 'invalid', 'The multipart body could not be read.', { file: 'The upload could not be read.' });
  }
  const file = form.get('file');
  if (!file || typeof file === 'string') throw new HttpError(400, 'invalid', 'Attach the CSV as the "file" field.', { file: 'No file was attached.' });
  if (file.size > MAX_UPLOAD_BYTES) throw tooLarge();
  // Only the content is used; the client's file name is never a path or an id.
  return Buffer.from(await file.arrayBuffer()).toString('utf8');
}

export interface StagedRow {
  line: number;
  takenAt: string;
  value: number;
  unit: LoggerRow['unit'];
  method: LoggerRow['method'];
  sampleTempC: number | null;
  correctedSg: number;
  lowConfidence: boolean;
  duplicate: boolean;
  /** Stored held for review with this reason (implausible, or a likely duplicate of a manual reading); null when it counts. */
  review: string | null;
}

export interface UploadPreview {
  uploadId: string;
  expiresAt: string;
  delimiter: string;
  counts: { accepted: number; rejected: number; duplicates: number; toImport: number; held: number };
  accepted: StagedRow[];
  rejected: Array<{ line: number; reason: string; raw: string }>;
  truncated: { accepted: boolean; rejected: boolean };
}

/**
 * Why an uploaded row is held for review: the plausibility checks a person would be asked about
 * (a file cannot answer), or a manual reading within a minute of it.
 */
function reviewOf(
  ws: Ctx['ws'],
  basis: PlausibilityBasis,
  manualTimes: Date[],
  row: { value: number; unit: LoggerRow['unit']; takenAt: Date },
  sg: number,
): string | null {
  const doubt = readingDoubt(ws.numberFormat, basis, row, sg);
  if (doubt) return doubt.reason;
  const near = manualTimes.find((t) => Math.abs(t.getTime() - row.takenAt.getTime()) < DUPLICATE_WINDOW_MS);
  return near ? `likely duplicate of a manual reading at ${clockTime(near, ws.timeZone)}` : null;
}

/** Parse, check and stage a logger CSV for one ferment; nothing is written to readings. */
export async function stageUpload(ctx: Ctx, fermentId: number, text: string, now = new Date()): Promise<UploadPreview> {
  const {
    ws,
    actor: { userId },
  } = ctx;
  const ferment = await getFerment(ctx, fermentId);
  if (ferment.emptiedAt) throw conflict(`${ferment.code} has been emptied; readings can no longer be added.`);
  const parsed = parseLoggerCsv(text, { timeZone: ws.timeZone, defaultTempUnit: temperatureUnitFor(ws.units) });
  if (parsed.fatal) {
    const status = parsed.fatal.code === 'too_many_rows' ? 413 : 422;
    throw new HttpError(status, parsed.fatal.code, `Nothing was imported. ${parsed.fatal.message}`);
  }
  const db = getDb();
  const existing = await db
    .select({ takenAt: readings.takenAt, correctedSg: readings.correctedSg, source: readings.source })
    .from(readings)
    .where(and(eq(readings.workspaceId, ws.id), eq(readings.fermentId, fermentId), isNull(readings.deletedAt)));
  const existingTimes = new Set(existing.map((r) => r.takenAt.getTime()));
  const manualTimes = existing.filter((r) => r.source === 'manual').map((r) => r.takenAt);
  const basis = await plausibilityBasis(ctx, ferment, now);
  const rejected = [...parsed.rejected];
  const accepted: StagedRow[] = [];
  const seenInFile = new Set<number>();
  // In time order, so "fermentation started" can look at the file's own earlier rows.
  const rows = [...parsed.rows].sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime() || a.line - b.line);
  const history = existing.map((r) => ({ takenAt: r.takenAt, correctedSg: r.correctedSg }));
  for (const row of rows) {
    try {
      const c = deriveCorrected(
        ws,
        ferment,
        { value: row.value, unit: row.unit, method: row.method, sampleTempC: row.sampleTempC, takenAt: row.takenAt },
        history,
        now,
      );
      const t = row.takenAt.getTime();
      const duplicate = existingTimes.has(t) || seenInFile.has(t);
      seenInFile.add(t);
      accepted.push({
        line: row.line,
        takenAt: row.takenAt.toISOString(),
        value: row.value,
        unit: row.unit,
        method: row.method,
        sampleTempC: row.sampleTempC,
        correctedSg: c.sg,
        lowConfidence: c.lowConfidence,
        duplicate,
        review: duplicate ? null : reviewOf(ws, basis, manualTimes, row, c.sg),
      });
      if (!duplicate) history.push({ takenAt: row.takenAt, correctedSg: c.sg });
    } catch (err) {
      if (err instanceof HttpError) rejected.push({ line: row.line, reason: err.message, raw: '' });
      else throw err;
    }
  }
  accepted.sort((a, b) => a.line - b.line);
  rejected.sort((a, b) => a.line - b.line);
  const duplicates = accepted.filter((r) => r.duplicate).length;
  const held = accepted.filter((r) => r.review !== null).length;
  const counts = { accepted: accepted.length, rejected: rejected.length, duplicates, toImport: accepted.length - duplicates, held };
  const uploadId = randomBytes(24).toString('base64url');
  const expiresAt = new Date(now.getTime() + UPLOAD_TTL_MS);
  await db.delete(readingUploads).where(and(eq(readingUploads.workspaceId, ws.id), lt(readingUploads.expiresAt, now)));
  await db.insert(readingUploads).values({
    id: uploadId,
    workspaceId: ws.id,
    fermentId,
    userId,
    accepted: accepted.filter((r) => !r.duplicate),
    summary: { counts, delimiter: parsed.delimiter },
    expiresAt,
    createdAt: now,
  });
  return {
    uploadId,
    expiresAt: expiresAt.toISOString(),
    delimiter: parsed.delimiter,
    counts,
    accepted: accepted.slice(0, PREVIEW_ROWS),
    rejected: rejected.slice(0, PREVIEW_REJECTED),
    truncated: { accepted: accepted.length > PREVIEW_ROWS, rejected: rejected.length > PREVIEW_REJECTED },
  };
}

/**
 * Import the staged rows in one transaction: every row is re-checked against the readings
 * as they are now; if any fails, nothing is written. Duplicates (same time as a reading
 * already there) are skipped, not imported twice.
 */
export async function commitUpload(
  ctx: Ctx,
  fermentId: number,
  uploadId: string,
  now = new Date(),
): Promise<{ imported: number; skippedDuplicates: number; held: number }> {
  const {
    ws,
    actor: { userId },
  } = ctx;
  const ferment = await getFerment(ctx, fermentId);
  const basis = await plausibilityBasis(ctx, ferment, now);
  const db = getDb();
  const result = await db.transaction(async (tx) => {
    const [staged] = await tx
      .select()
      .from(readingUploads)
      .where(and(eq(readingUploads.id, uploadId), eq(readingUploads.workspaceId, ws.id), eq(readingUploads.fermentId, fermentId)))
      .for('update');
    if (!staged) throw notFound('No such upload (it may have expired): upload the file again.');
    if (staged.committedAt) throw conflict('This upload has already been imported.');
    if (staged.expiresAt.getTime() <= now.getTime()) throw new HttpError(410, 'expired', 'This preview expired after an hour: upload the file again.');
    if (ferment.emptiedAt) throw conflict(`${ferment.code} has been emptied; readings can no longer be added.`);
    const rows = (staged.accepted as StagedRow[]).map((r) => ({ ...r, at: new Date(r.takenAt) })).sort((a, b) => a.at.getTime() - b.at.getTime());
    const existing = await tx
      .select({ takenAt: readings.takenAt, correctedSg: readings.correctedSg, source: readings.source })
      .from(readings)
      .where(and(eq(readings.workspaceId, ws.id), eq(readings.fermentId, fermentId), isNull(readings.deletedAt)));
    const times = new Set(existing.map((r) => r.takenAt.getTime()));
    const manualTimes = existing.filter((r) => r.source === 'manual').map((r) => r.takenAt);
    const history = existing.map((r) => ({ takenAt: r.takenAt, correctedSg: r.correctedSg }));
    const values: Array<typeof readings.$inferInsert> = [];
    let skipped = 0;
    for (const r of rows) {
      if (times.has(r.at.getTime())) {
        skipped++;
        continue;
      }
      let c: { sg: number; lowConfidence: boolean };
      try {
        c = deriveCorrected(ws, ferment, { value: r.value, unit: r.unit, method: r.method, sampleTempC: r.sampleTempC, takenAt: r.at }, history, now);
      } catch (err) {
        if (err instanceof HttpError)
          throw new HttpError(409, 'row_failed', `Nothing was imported: line ${r.line} no longer passes (${err.message}). Upload the file again.`);
        throw err;
      }
      times.add(r.at.getTime());
      history.push({ takenAt: r.at, correctedSg: c.sg });
      values.push({
        workspaceId: ws.id,
        fermentId,
        takenAt: r.at,
        method: r.method,
        rawValue: r.value,
        rawUnit: r.unit,
        sampleTempC: r.sampleTempC,
        sampleTempUnit: r.sampleTempC === null ? null : 'C',
        correctedSg: c.sg,
        lowConfidence: c.lowConfidence,
        source: 'upload',
        uploadId,
        takenBy: userId,
        reviewReason: reviewOf(ws, basis, manualTimes, { value: r.value, unit: r.unit, takenAt: r.at }, c.sg),
      });
    }
    for (let i = 0; i < values.length; i += 1000) await tx.insert(readings).values(values.slice(i, i + 1000));
    const marked = await tx
      .update(readingUploads)
      .set({ committedAt: now })
      .where(and(eq(readingUploads.id, uploadId), isNull(readingUploads.committedAt), gt(readingUploads.expiresAt, now)));
    if ((marked as unknown as [{ affectedRows: number }])[0].affectedRows !== 1) throw conflict('This upload has already been imported.');
    await audit(
      {
        workspaceId: ws.id,
        userId,
        action: 'reading.upload',
        entityType: 'ferment',
        entityId: fermentId,
        details: { uploadId, imported: values.length, skippedDuplicates: skipped, held: values.filter((v) => v.reviewReason).length },
      },
      tx,
    );
    return { imported: values.length, skippedDuplicates: skipped, held: values.filter((v) => v.reviewReason).length };
  });
  await recomputeForecast(ctx, fermentId, now);
  return result;
}
