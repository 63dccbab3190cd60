import { useRef, useState } from 'react';
import { RAW_DEGREES_MAX, RAW_DEGREES_MIN, RAW_SG_MAX, RAW_SG_MIN, SAMPLE_TEMP_MAX_C, SAMPLE_TEMP_MIN_C } from '../../lib/csv/format';

interface Preview {
  uploadId: string;
  expiresAt: string;
  /** `held`: rows that will be stored held for review (they look wrong, or repeat a manual reading). */
  counts: { accepted: number; rejected: number; duplicates: number; toImport: number; held?: number };
  accepted: Array<{
    line: number;
    takenAt: string;
    value: number;
    unit: string;
    method: string;
    sampleTempC: number | null;
    correctedSg: number;
    lowConfidence: boolean;
    duplicate: boolean;
    /** Why the row will be held for review; null when it counts at once. */
    review?: string | null;
  }>;
  rejected: Array<{ line: number; reason: string; raw: string }>;
  truncated: { accepted: boolean; rejected: boolean };
}

type Phase =
  | { kind: 'idle' }
  | { kind: 'uploading'; pct: number }
  | { kind: 'parsing' }
  | { kind: 'preview'; preview: Preview }
  | { kind: 'committing'; preview: Preview };

export interface UploadPanelProps {
  fermentId: number;
  maxBytes: number;
  maxRows: number;
  timeZone: string;
  onImported: (n: number) => void;
}

const fmtTime = (iso: string, timeZone: string) =>
  new Intl.DateTimeFormat('en-GB', { timeZone, day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit', hour12: false }).format(new Date(iso));

/** Logger CSV: upload with a progress bar, preview (accepted, rejected, duplicates), then import in one go. */
export default function UploadPanel(p: UploadPanelProps) {
  const [phase, setPhase] = useState<Phase>({ kind: 'idle' });
  const [error, setError] = useState('');
  const [done, setDone] = useState('');
  const fileRef = useRef<HTMLInputElement>(null);

  function upload() {
    const file = fileRef.current?.files?.[0];
    setError('');
    setDone('');
    if (!file) {
      setError('Choose a CSV file first.');
      return;
    }
    if (file.size > p.maxBytes) {
      setError(`The file is ${(file.size / 1048576).toFixed(1)} MB; the limit is ${(p.maxBytes / 1048576).toFixed(0)} MB. Split it into smaller files.`);
      return;
    }
    const xhr = new XMLHttpRequest();
    xhr.open('POST', `/api/ferments/${p.fermentId}/uploads`);
    xhr.setRequestHeader('content-type', 'text/csv; charset=utf-8');
    xhr.setRequestHeader('accept', 'application/json');
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) setPhase({ kind: 'uploading', pct: Math.round((e.loaded / e.total) * 100) });
    };
    xhr.upload.onload = () => setPhase({ kind: 'parsing' });
    xhr.onerror = () => {
      setPhase({ kind: 'idle' });
      setError('The upload failed (no connection?). Nothing was imported.');
    };
    xhr.onload = () => {
      let data: { preview?: Preview; error?: { message?: string; fields?: Record<string, string> } } | null = null;
      try {
        data = JSON.parse(xhr.responseText);
      } catch {
        /* not JSON */
      }
      if (xhr.status === 201 && data?.preview) setPhase({ kind: 'preview', preview: data.preview });
      else {
        setPhase({ kind: 'idle' });
        setError(data?.error?.message ?? `The upload was refused (${xhr.status}). Nothing was imported.`);
      }
    };
    setPhase({ kind: 'uploading', pct: 0 });
    xhr.send(file);
  }

  async function commit(preview: Preview) {
    setPhase({ kind: 'committing', preview });
    const res = await fetch(`/api/ferments/${p.fermentId}/uploads/${preview.uploadId}/commit`, {
      method: 'POST',
      headers: { accept: 'application/json' },
    }).catch(() => null);
    const data = await res?.json().catch(() => null);
    if (res?.ok) {
      setPhase({ kind: 'idle' });
      setDone(
        `Imported ${data.imported} reading${data.imported === 1 ? '' : 's'}${data.skippedDuplicates ? ` (${data.skippedDuplicates} already there, skipped)` : ''}.` +
          (data.held ? ` ${data.held} held for review: accept or delete ${data.held === 1 ? 'it' : 'them'} in the readings below.` : ''),
      );
      if (fileRef.current) fileRef.current.value = '';
      p.onImported(data.imported);
    } else {
      setPhase({ kind: 'preview', preview });
      setError(data?.error?.message ?? 'The import failed; nothing was imported. Try again.');
    }
  }

  const busy = phase.kind === 'uploading' || phase.kind === 'parsing' || phase.kind === 'committing';
  return (
    <section className="card mt-4" aria-labelledby="upload-heading">
      <h2 id="upload-heading">Upload logger readings (CSV)</h2>
      <p className="mt-1 text-sm text-ink-soft">
        Columns time, value and optionally unit, method, temperature; comma or semicolon; at most {(p.maxBytes / 1048576).toFixed(0)} MB and{' '}
        {p.maxRows.toLocaleString('en-GB')} readings. Times without a zone are read in {p.timeZone}.
      </p>
      <div className="mt-3 flex flex-wrap items-end gap-3">
        <div className="field">
          <label htmlFor="csv-file">CSV file</label>
          <input id="csv-file" ref={fileRef} type="file" accept=".csv,text/csv" className="input" disabled={busy} />
        </div>
        <button type="button" className="btn" onClick={upload} disabled={busy}>
          Upload and check
        </button>
      </div>
      {phase.kind === 'uploading' && (
        <div className="mt-3">
          <label htmlFor="upload-progress" className="label">
            Uploading… {phase.pct} %
          </label>
          <progress id="upload-progress" className="block h-3 w-full" max={100} value={phase.pct} />
        </div>
      )}
      {phase.kind === 'parsing' && (
        <div className="mt-3">
          <label htmlFor="parse-progress" className="label">
            Checking every line…
          </label>
          <progress id="parse-progress" className="block h-3 w-full" />
        </div>
      )}
      <p role="status" aria-live="polite" className="mt-2 font-semibold text-verdigris" data-testid="upload-done">
        {done}
      </p>
      {error && (
        <p role="alert" className="field-error mt-2" data-testid="upload-error">
          {error}
        </p>
      )}
      {(phase.kind === 'preview' || phase.kind === 'committing') && (
        <div className="mt-3" data-testid="upload-preview">
          <h3 className="font-semibold">Preview</h3>
          <ul className="mt-1 flex flex-wrap gap-2 text-sm">
            <li className="tag tag-settled text-[#17604a]">{phase.preview.counts.toImport} to import</li>
            <li className="tag tag-working">
              {phase.preview.counts.duplicates} duplicate{phase.preview.counts.duplicates === 1 ? '' : 's'}
            </li>
            <li className="tag tag-stalled">{phase.preview.counts.rejected} rejected</li>
            {!!phase.preview.counts.held && (
              <li className="tag tag-stalled" data-testid="upload-held">
                {phase.preview.counts.held} held for review
              </li>
            )}
          </ul>
          {!!phase.preview.counts.held && (
            <p className="mt-1 text-sm">
              Lines held for review are imported but left out of the forecast until someone accepts them: a file cannot answer “did you mean…?”.
            </p>
          )}
          {phase.preview.rejected.length > 0 && (
            <details className="mt-2" open={phase.preview.counts.toImport === 0}>
              <summary className="cursor-pointer font-semibold">Rejected lines</summary>
              <div className="mt-1 max-h-60 overflow-auto text-sm" tabIndex={0} role="region" aria-label="Rejected lines with reasons">
                <ul>
                  {phase.preview.rejected.map((r) => (
                    <li key={r.line}>
                      <strong>Line {r.line}:</strong> {r.reason}
                    </li>
                  ))}
                </ul>
              </div>
              {phase.preview.truncated.rejected && <p className="text-sm text-ink-soft">Only the first {phase.preview.rejected.length} are listed.</p>}
            </details>
          )}
          {phase.preview.accepted.length > 0 && (
            <div className="mt-2 max-h-72 overflow-auto" tabIndex={0} role="region" aria-label="Accepted lines">
              <table className="data-table text-sm">
                <caption className="sr-only">Accepted lines</caption>
                <thead>
                  <tr>
                    <th scope="col">Line</th>
                    <th scope="col">Time</th>
                    <th scope="col">As read</th>
                    <th scope="col">Corrected SG</th>
                    <th scope="col">Note</th>
                  </tr>
                </thead>
                <tbody>
                  {phase.preview.accepted.map((r) => (
                    <tr key={r.line} className={r.duplicate ? 'text-ink-soft' : r.review ? 'bg-ember-soft' : ''}>
                      <td>{r.line}</td>
                      <td className="whitespace-nowrap">{fmtTime(r.takenAt, p.timeZone)}</td>
                      <td>
                        {r.unit === 'sg' ? r.value.toFixed(3) : `${r.value} ${r.unit === 'brix' ? '°Bx' : '°P'}`} · {r.method}
                      </td>
                      <td className="tabular-nums">{r.correctedSg.toFixed(4)}</td>
                      <td>
                        {r.duplicate
                          ? 'duplicate: already logged at this time, skipped'
                          : [r.review ? `held for review: ${r.review}` : '', r.lowConfidence ? 'refractometer, less certain' : ''].filter(Boolean).join('; ')}
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
              {phase.preview.truncated.accepted && (
                <p className="text-sm text-ink-soft">
                  Showing the first {phase.preview.accepted.length} of {phase.preview.counts.accepted} accepted lines.
                </p>
              )}
            </div>
          )}
          <div className="mt-3 flex flex-wrap gap-3">
            <button
              type="button"
              className="btn"
              disabled={phase.kind === 'committing' || phase.preview.counts.toImport === 0}
              onClick={() => commit(phase.preview)}
            >
              {phase.kind === 'committing' ? 'Importing…' : `Import ${phase.preview.counts.toImport} reading${phase.preview.counts.toImport === 1 ? '' : 's'}`}
            </button>
            <button type="button" className="btn btn-quiet" disabled={phase.kind === 'committing'} onClick={() => setPhase({ kind: 'idle' })}>
              Discard
            </button>
          </div>
          <p className="mt-1 text-xs text-ink-soft">The preview is kept for an hour. Importing is all or nothing.</p>
        </div>
      )}
      <CsvFormatHelp maxBytes={p.maxBytes} maxRows={p.maxRows} timeZone={p.timeZone} />
    </section>
  );
}

const code = (text: string) => <code className="rounded bg-ground px-1">{text}</code>;

/** The logger CSV format, as the parser in src/lib/csv reads it (its reference text is LOGGER_CSV_FORMAT_DOC). */
export function CsvFormatHelp({ maxBytes, maxRows, timeZone }: { maxBytes: number; maxRows: number; timeZone: string }) {
  const columns: Array<[string, string[], string, string]> = [
    ['time', ['timestamp', 'taken_at', 'date'], 'yes', 'date and time of the reading (see Times)'],
    ['value', ['reading', 'gravity', 'sg'], 'yes', 'the reading as the instrument showed it'],
    ['unit', [], 'no (default sg)', 'sg, brix (or bx, °bx), plato (or °p)'],
    ['method', ['instrument'], 'no (default digital)', 'hydrometer, refractometer or digital'],
    ['temperature', ['temp', 'sample_temp'], 'no', 'sample temperature in the unit set for the upload (°C or °F)'],
    ['temp_c', [], 'no', 'sample temperature in °C'],
    ['temp_f', [], 'no', 'sample temperature in °F'],
  ];
  return (
    <details className="mt-4 border-t border-line pt-3" data-testid="csv-format-help">
      <summary className="min-h-11 cursor-pointer py-2 font-semibold">Logger CSV format</summary>
      <div className="mt-2 flex flex-col gap-3 text-sm">
        <p>
          One reading per line, with a header line naming the columns. Column order is free, header names are case-insensitive, and columns not listed here are
          ignored.
        </p>
        <div className="relative overflow-x-auto">
          <table className="data-table">
            <caption className="sr-only">Columns of a logger CSV file</caption>
            <thead>
              <tr>
                <th scope="col">Column</th>
                <th scope="col">Also accepted as</th>
                <th scope="col">Required</th>
                <th scope="col">Content</th>
              </tr>
            </thead>
            <tbody>
              {columns.map(([name, aliases, required, content]) => (
                <tr key={name}>
                  <th scope="row" className="text-left font-normal">
                    {code(name)}
                  </th>
                  <td>
                    {aliases.length
                      ? aliases.map((a, i) => (
                          <span key={a}>
                            {i > 0 && ', '}
                            {code(a)}
                          </span>
                        ))
                      : '–'}
                  </td>
                  <td>{required}</td>
                  <td>{content}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <p>Use at most one temperature column. A digital sensor is taken as temperature-compensated; a hydrometer reading needs a temperature.</p>
        <h3 className="font-semibold">Separators</h3>
        <p>
          Comma or semicolon, detected from the header line. In a semicolon-separated file a decimal comma is accepted ({code('1,050')} means 1.050); in a
          comma-separated file write decimals with a point. Quote fields as in RFC 4180.
        </p>
        <h3 className="font-semibold">Encoding</h3>
        <p>UTF-8, with or without a byte-order mark; CRLF or LF line ends. Blank lines are skipped.</p>
        <h3 className="font-semibold">Times</h3>
        <p>
          ISO 8601 date and time, {code('YYYY-MM-DDTHH:MM')} or {code('YYYY-MM-DD HH:MM')}, optionally with seconds and fractions of a second.
        </p>
        <ul className="list-disc pl-5">
          <li>
            With a zone ({code('Z')}, {code('+01:00')}, {code('-0500')}) the time is taken as written.
          </li>
          <li>
            Without a zone the time is read in {timeZone}. A time skipped when the clocks go forward does not exist and the line is rejected; a time that occurs
            twice when the clocks go back is taken as its first occurrence.
          </li>
          <li>Day-first or month-first dates such as {code('03/11/2026')} are not accepted: they are ambiguous.</li>
          <li>Readings dated in the future (beyond a few minutes of clock drift) are rejected.</li>
        </ul>
        <h3 className="font-semibold">Plausible values</h3>
        <p>
          SG {RAW_SG_MIN.toFixed(3)}–{RAW_SG_MAX.toFixed(3)}; °Brix and °Plato {RAW_DEGREES_MIN} to {RAW_DEGREES_MAX}; temperature {SAMPLE_TEMP_MIN_C} to{' '}
          {SAMPLE_TEMP_MAX_C} °C. Values must be plain numbers: a cell such as {code('=1+1')} or {code('@SUM(A1)')} is rejected as not a number. A line that
          reads but looks wrong (past 100 % apparent attenuation, above the OG, far off the fitted curve, or within a minute of a manual reading) is imported
          held for review.
        </p>
        <h3 className="font-semibold">Limits</h3>
        <p>
          At most {(maxBytes / 1048576).toFixed(0)} MB and {maxRows.toLocaleString('en-GB')} readings per file. Lines that fail a check are listed with their
          line number (the header is line 1) and reason; the other lines are imported.
        </p>
        <h3 className="font-semibold">Example</h3>
        <pre className="overflow-x-auto rounded bg-ground p-2">
          {`time,value,unit,method,temperature
2026-11-03T14:00:00Z,1.062,sg,hydrometer,21.5
2026-11-03 20:00,1.058,sg,digital,
2026-11-04 08:00,12.4,brix,refractometer,`}
        </pre>
      </div>
    </details>
  );
}
