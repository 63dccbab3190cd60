import { useRef, useState } from 'react';

interface Preview {
  uploadId: string;
  expiresAt: string;
  counts: { accepted: number; rejected: number; duplicates: number; toImport: number };
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
        `Imported ${data.imported} reading${data.imported === 1 ? '' : 's'}${data.skippedDuplicates ? ` (${data.skippedDuplicates} already there, skipped)` : ''}.`,
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
          </ul>
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
                    <tr key={r.line} className={r.duplicate ? 'text-ink-soft' : ''}>
                      <td>{r.line}</td>
                      <td className="whitespace-nowrap">{fmtTime(r.takenAt, p.timeZone)}</td>
                      <td>
                        {r.unit === 'sg' ? r.value.toFixed(3) : `${r.value} ${r.unit === 'brix' ? '°Bx' : '°P'}`} · {r.method}
                      </td>
                      <td className="tabular-nums">{r.correctedSg.toFixed(4)}</td>
                      <td>{r.duplicate ? 'duplicate: already logged at this time, skipped' : r.lowConfidence ? 'refractometer, less certain' : ''}</td>
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
    </section>
  );
}
