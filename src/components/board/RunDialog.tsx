import { useEffect, useMemo, useRef, useState } from 'react';
import type { Board, BoardRun } from '../../lib/board';
import {
  dayAndTime,
  defaultRunMinutes,
  RUN_STATUS_LABELS,
  RUN_TYPE_LABELS,
  SAFETY_CAUTIONS,
  toFermentState,
  toScheduleRun,
  toScheduleStill,
} from '../../lib/board';
import { computeRunWarnings, wallClock, zonedDateTime, type RunType, type Warning } from '../../lib/schedule';
import { actualLine } from '../runs/actual-words';
import { formatVolume, parseVolumeToLitres, volumeForDisplay, volumeUnitFor, type UnitSystem } from '../../lib/units';
import { RUN_TYPES } from '../../lib/vocabulary';
import { runRecordHref, runRecordLinkText, takesRecord } from '../runs/record-link';
import { ConfirmRunAction } from '../runs/ConfirmRunAction';
import { actionExplained } from '../runs/run-action';
import NumberField, { NumberValueField, readNumber, refusedIn, typedText, type NumberFormat } from '../forms/NumberField';

export interface DialogDraft {
  /** Null when booking a new run. */
  run: BoardRun | null;
  stillId: number;
  startsAt: Date;
  type: RunType;
  ferments: Array<{ fermentId: number; litres: number }>;
}

export interface RunDialogProps {
  board: Board;
  draft: DialogDraft;
  units: UnitSystem;
  /** How the distillery types numbers (charge, litres, minutes). */
  numberFormat?: NumberFormat;
  canBook: boolean;
  canOperate: boolean;
  busy: boolean;
  error: string | null;
  onClose: () => void;
  onSave: (body: Record<string, unknown>, run: BoardRun | null) => void;
  /** Cancel asks and sends itself; start and finish are called once the server has done them (after the confirmation dialog). */
  onAction: (action: 'cancel' | 'start' | 'finish', run: BoardRun) => void;
}

function localInput(date: Date, tz: string): string {
  const w = wallClock(date, tz);
  return `${w.ymd}T${w.hm}`;
}

function fromLocalInput(value: string, tz: string): Date | null {
  const m = /^(\d{4}-\d{2}-\d{2})T(\d{2}:\d{2})/.exec(value);
  return m ? zonedDateTime(m[1]!, m[2]!, tz) : null;
}

function runTimingLine(r: BoardRun, tz: string): string | null {
  const line = actualLine(r, (d) => dayAndTime(d, tz));
  return line ? `${line} · booked ${dayAndTime(r.startsAt, tz)} to ${dayAndTime(r.endsAt, tz)}` : null;
}

export function RunDialog(p: RunDialogProps) {
  const { board, draft } = p;
  const tz = board.timeZone;
  const ref = useRef<HTMLDialogElement>(null);
  const existing = draft.run;
  const editable = p.canBook && (!existing || existing.status === 'planned' || existing.status === 'confirmed');
  const unit = volumeUnitFor(p.units);
  const format = p.numberFormat ?? 'point';
  const toUnit = (l: number | null) => (l === null ? '' : typedText(Math.round(volumeForDisplay(l, p.units) * 10) / 10, format));

  const [type, setType] = useState<RunType>(existing?.type ?? draft.type);
  const [stillId, setStillId] = useState(existing?.stillId ?? draft.stillId);
  const [start, setStart] = useState(localInput(existing?.startsAt ?? draft.startsAt, tz));
  const [status, setStatus] = useState<'planned' | 'confirmed'>(existing?.status === 'confirmed' ? 'confirmed' : 'planned');
  const [operatorId, setOperatorId] = useState<string>(existing?.operatorId ? String(existing.operatorId) : '');
  const [lines, setLines] = useState(existing?.ferments ?? draft.ferments);
  const [feeds, setFeeds] = useState(existing?.feeds ?? []);
  const [charge, setCharge] = useState(toUnit(existing ? existing.chargeLitres : draft.ferments.reduce((s, l) => s + l.litres, 0) || null));
  const [notes, setNotes] = useState(existing?.notes ?? '');
  const [confirming, setConfirming] = useState<'start' | 'finish' | null>(null);
  const still = board.stills.find((s) => s.id === stillId) ?? board.stills[0]!;
  const chargeRead = readNumber(charge, format);
  const chargeLitres = chargeRead.ok && chargeRead.value !== null ? parseVolumeToLitres(chargeRead.value, unit) : null;
  const suggested = defaultRunMinutes(still, type, chargeLitres, existing?.chargeAbv ?? null);
  const [minutes, setMinutes] = useState<string>(existing ? String(Math.round((existing.endsAt.getTime() - existing.startsAt.getTime()) / 60000)) : '');
  const minutesRead = readNumber(minutes, format);
  const duration = minutesRead.ok && minutesRead.value !== null ? minutesRead.value : suggested;

  useEffect(() => {
    const d = ref.current;
    if (d && !d.open) d.showModal();
  }, []);

  // A done run links to its record for those who may record; the words depend on whether fractions are saved yet.
  const recordRunId = existing && p.canOperate && existing.status === 'done' && takesRecord(existing.type) ? existing.id : null;
  const [recorded, setRecorded] = useState<boolean | null>(null);
  useEffect(() => {
    if (recordRunId === null) return;
    let current = true;
    fetch(`/api/runs/${recordRunId}/outcomes`, { headers: { accept: 'application/json' }, credentials: 'same-origin' })
      .then((res) => (res.ok ? res.json() : null))
      .then((body: { record?: { fractions?: unknown[] } } | null) => {
        if (current && body?.record?.fractions) setRecorded(body.record.fractions.length > 0);
      })
      // Unknown: the link stays, worded "Run record".
      .catch(() => undefined);
    return () => {
      current = false;
    };
  }, [recordRunId]);

  const startsAt = fromLocalInput(start, tz);
  const preview: Warning[] = useMemo(() => {
    if (!startsAt || !(duration > 0)) return [];
    const run = toScheduleRun({
      id: existing?.id ?? -1,
      stillId,
      type,
      status: existing && !editable ? existing.status : status,
      startsAt,
      endsAt: new Date(startsAt.getTime() + duration * 60000),
      operatorId: operatorId ? Number(operatorId) : null,
      chargeLitres,
      chargeAbv: null,
      ferments: type === 'stripping' || type === 'redistillation' ? lines : [],
      feeds: type === 'spirit' || type === 'redistillation' ? feeds : [],
      lowWinesLitres: existing?.lowWinesLitres ?? null,
      version: 0,
      sequence: 0,
      notes: null,
    });
    return computeRunWarnings(run, {
      still: toScheduleStill(still),
      runs: board.runs.filter((r) => r.id !== existing?.id).map(toScheduleRun),
      ferments: new Map(board.ferments.map((f) => [f.id, toFermentState(f)])),
      timeZone: tz,
      now: board.now,
      atRiskThreshold: board.atRiskThreshold,
    });
    // Recomputed when the form's fields change; the board and the run being edited are fixed while the dialog is open.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [start, duration, stillId, type, status, operatorId, chargeLitres, lines, feeds]);

  const openFerments = board.ferments.filter((f) => !f.emptiedAt || lines.some((l) => l.fermentId === f.id));
  const strippingRuns = board.runs.filter((r) => r.type === 'stripping' && r.status !== 'cancelled' && r.id !== existing?.id);
  const stillName = (id: number) => board.stills.find((s) => s.id === id)?.name ?? 'a retired still';

  function submit(e: React.FormEvent) {
    e.preventDefault();
    if (!startsAt) return;
    // A number that cannot be read is refused beside its field (focused); nothing is sent.
    if (refusedIn(e.currentTarget as HTMLFormElement)) return;
    const endsAt = new Date(startsAt.getTime() + duration * 60000);
    const body: Record<string, unknown> = {
      stillId,
      type,
      status,
      startsAt: startsAt.toISOString(),
      endsAt: endsAt.toISOString(),
      operatorId: operatorId ? Number(operatorId) : null,
      chargeLitres,
      notes: notes.trim() || null,
      // Lines are sent as they are: one without litres is refused with its field named, never dropped.
      ferments: type === 'stripping' || type === 'redistillation' ? lines : [],
      feeds: type === 'spirit' || type === 'redistillation' ? feeds : [],
    };
    if (existing) body.version = existing.version;
    p.onSave(body, existing);
  }

  // A started or done run says when it really ran beside its booking.
  const actualText = existing && (existing.status === 'running' || existing.status === 'done') ? runTimingLine(existing, tz) : null;
  const heading = existing ? `${RUN_TYPE_LABELS[existing.type]} on ${stillName(existing.stillId)}` : 'Book a run';
  return (
    <dialog
      ref={ref}
      className="run-dialog"
      aria-labelledby="run-dialog-title"
      onClose={p.onClose}
      onCancel={(e) => {
        e.preventDefault();
        p.onClose();
      }}
    >
      <form onSubmit={submit} className="flex flex-col gap-3">
        <div className="flex items-start justify-between gap-3">
          <div>
            <h2 id="run-dialog-title">{heading}</h2>
            {existing && (
              <p className="text-sm text-ink-soft">
                {RUN_STATUS_LABELS[existing.status]} · version {existing.version} · <a href={`/runs/${existing.id}`}>Open the run page</a>
              </p>
            )}
            {existing && actualText && (
              <p className="text-sm font-semibold" data-testid="run-dialog-actual">
                {actualText}
              </p>
            )}
          </div>
          <button type="button" className="btn btn-quiet" onClick={p.onClose} aria-label="Close">
            ✕
          </button>
        </div>
        {p.error && (
          <p className="field-error" role="alert">
            {p.error}
          </p>
        )}
        <fieldset disabled={!editable || p.busy} className="grid grid-cols-1 gap-3 sm:grid-cols-2">
          <div className="field">
            <label htmlFor="rd-type">Run type</label>
            <select id="rd-type" className="input" value={type} onChange={(e) => setType(e.target.value as RunType)}>
              {RUN_TYPES.map((t) => (
                <option key={t} value={t}>
                  {RUN_TYPE_LABELS[t]}
                </option>
              ))}
            </select>
          </div>
          <div className="field">
            <label htmlFor="rd-still">Still</label>
            <select id="rd-still" className="input" value={stillId} onChange={(e) => setStillId(Number(e.target.value))}>
              {board.stills.map((s) => (
                <option key={s.id} value={s.id}>
                  {s.name} ({formatVolume(s.capacityLitres, p.units)})
                </option>
              ))}
            </select>
          </div>
          <div className="field">
            <label htmlFor="rd-start">Starts ({tz})</label>
            <input id="rd-start" className="input" type="datetime-local" step={1800} value={start} onChange={(e) => setStart(e.target.value)} required />
          </div>
          <div className="field">
            <label htmlFor="rd-minutes">Length in minutes</label>
            <NumberField id="rd-minutes" format={format} unit="min" placeholder={String(suggested)} value={minutes} onValueChange={setMinutes} />
            <span className="text-xs text-ink-soft">
              Estimate: {suggested} min (heat-up of the charge on {still.heatingKw} kW plus {still.typicalMinutes[type]} min typical
              {still.cleaningAfterRunMinutes && (type === 'stripping' || type === 'spirit' || type === 'redistillation')
                ? `; then ${still.cleaningAfterRunMinutes} min cleaning`
                : ''}
              ).
            </span>
          </div>
          <div className="field">
            <label htmlFor="rd-charge">Charge ({unit === 'L' ? 'litres' : 'US gallons'})</label>
            <NumberField id="rd-charge" format={format} unit={unit} value={charge} onValueChange={setCharge} />
            <span className="text-xs text-ink-soft">Working capacity {formatVolume(still.capacityLitres, p.units)}</span>
          </div>
          <div className="field">
            <label htmlFor="rd-operator">Operator</label>
            <select id="rd-operator" className="input" value={operatorId} onChange={(e) => setOperatorId(e.target.value)}>
              <option value="">Nobody yet</option>
              {board.people
                .filter((x) => x.role !== 'staff')
                .map((x) => (
                  <option key={x.id} value={x.id}>
                    {x.name}
                  </option>
                ))}
            </select>
          </div>
          <div className="field">
            <label htmlFor="rd-status">Booking</label>
            <select id="rd-status" className="input" value={status} onChange={(e) => setStatus(e.target.value as 'planned' | 'confirmed')}>
              <option value="planned">Planned</option>
              <option value="confirmed">Confirmed</option>
            </select>
          </div>
          {(type === 'stripping' || type === 'redistillation') && (
            <div className="field sm:col-span-2">
              <span className="label">Washes in the charge</span>
              {lines.map((l, i) => (
                <div key={i} className="flex flex-wrap items-center gap-2">
                  <label className="sr-only" htmlFor={`rd-f-${i}`}>
                    Wash {i + 1}
                  </label>
                  <select
                    id={`rd-f-${i}`}
                    className="input"
                    value={l.fermentId}
                    onChange={(e) => setLines(lines.map((x, j) => (j === i ? { ...x, fermentId: Number(e.target.value) } : x)))}
                  >
                    {openFerments.map((f) => (
                      <option key={f.id} value={f.id}>
                        {f.code} ({formatVolume(f.volumeLitres, p.units)}, {f.status.replace('_', ' ')})
                      </option>
                    ))}
                  </select>
                  <label className="sr-only" htmlFor={`rd-fl-${i}`}>
                    Litres of wash {i + 1}
                  </label>
                  <NumberValueField
                    id={`rd-fl-${i}`}
                    className="input w-28"
                    format={format}
                    number={Math.round(volumeForDisplay(l.litres, p.units) * 10) / 10}
                    onNumber={(n) => setLines(lines.map((x, j) => (j === i ? { ...x, litres: parseVolumeToLitres(n ?? 0, unit) } : x)))}
                  />
                  <span>{unit}</span>
                  <button type="button" className="btn btn-quiet" onClick={() => setLines(lines.filter((_, j) => j !== i))}>
                    Remove
                  </button>
                </div>
              ))}
              {openFerments.length > 0 && (
                <button type="button" className="btn btn-quiet self-start" onClick={() => setLines([...lines, { fermentId: openFerments[0]!.id, litres: 0 }])}>
                  Add a wash
                </button>
              )}
            </div>
          )}
          {(type === 'spirit' || type === 'redistillation') && (
            <div className="field sm:col-span-2">
              <span className="label">Low wines from stripping runs</span>
              {feeds.map((l, i) => (
                <div key={i} className="flex flex-wrap items-center gap-2">
                  <label className="sr-only" htmlFor={`rd-r-${i}`}>
                    Feeding run {i + 1}
                  </label>
                  <select
                    id={`rd-r-${i}`}
                    className="input"
                    value={l.runId}
                    onChange={(e) => setFeeds(feeds.map((x, j) => (j === i ? { ...x, runId: Number(e.target.value) } : x)))}
                  >
                    {strippingRuns.map((r) => (
                      <option key={r.id} value={r.id}>
                        {stillName(r.stillId)} {localInput(r.startsAt, tz).replace('T', ' ')}
                      </option>
                    ))}
                  </select>
                  <label className="sr-only" htmlFor={`rd-rl-${i}`}>
                    Litres from feeding run {i + 1}
                  </label>
                  <NumberValueField
                    id={`rd-rl-${i}`}
                    className="input w-28"
                    format={format}
                    number={Math.round(volumeForDisplay(l.litres, p.units) * 10) / 10}
                    onNumber={(n) => setFeeds(feeds.map((x, j) => (j === i ? { ...x, litres: parseVolumeToLitres(n ?? 0, unit) } : x)))}
                  />
                  <span>{unit}</span>
                  <button type="button" className="btn btn-quiet" onClick={() => setFeeds(feeds.filter((_, j) => j !== i))}>
                    Remove
                  </button>
                </div>
              ))}
              {strippingRuns.length > 0 && (
                <button type="button" className="btn btn-quiet self-start" onClick={() => setFeeds([...feeds, { runId: strippingRuns[0]!.id, litres: 0 }])}>
                  Add a feeding run
                </button>
              )}
            </div>
          )}
          <div className="field sm:col-span-2">
            <label htmlFor="rd-notes">Notes</label>
            <textarea id="rd-notes" className="input" rows={2} value={notes} onChange={(e) => setNotes(e.target.value)} />
          </div>
        </fieldset>
        {preview.length > 0 && (
          <ul className="run-dialog-warnings" aria-label="Warnings for this booking">
            {preview.map((w, i) => (
              <li key={i} className={`wl wl-${w.severity}`}>
                {w.message}
              </li>
            ))}
          </ul>
        )}
        <details className="caution">
          <summary className="font-semibold">Before you run a still</summary>
          <ul className="mt-2 list-disc pl-5 text-sm">
            {SAFETY_CAUTIONS.map((c) => (
              <li key={c}>{c}</li>
            ))}
          </ul>
        </details>
        <div className="flex flex-wrap gap-2">
          {recordRunId !== null && (
            <a className="btn" href={runRecordHref(recordRunId)} data-testid={`run-record-link-${recordRunId}`}>
              {runRecordLinkText(recorded !== false)}
            </a>
          )}
          {editable && (
            <button type="submit" className="btn" disabled={p.busy}>
              {existing ? 'Save changes' : 'Book run'}
            </button>
          )}
          {existing && p.canOperate && (existing.status === 'planned' || existing.status === 'confirmed') && (
            <button type="button" className="btn btn-quiet" disabled={p.busy} onClick={() => setConfirming('start')}>
              Start run
            </button>
          )}
          {existing && p.canOperate && existing.status === 'running' && (
            <button type="button" className="btn btn-quiet" disabled={p.busy} onClick={() => setConfirming('finish')}>
              Finish run
            </button>
          )}
          {existing && p.canBook && (existing.status === 'planned' || existing.status === 'confirmed') && (
            <button type="button" className="btn btn-danger ml-auto" disabled={p.busy} onClick={() => p.onAction('cancel', existing)}>
              Cancel this run
            </button>
          )}
        </div>
      </form>
      {existing && confirming && (
        <ConfirmRunAction
          runId={existing.id}
          version={existing.version}
          action={confirming}
          label={RUN_TYPE_LABELS[existing.type].toLowerCase()}
          explanation={actionExplained(
            confirming,
            RUN_TYPE_LABELS[existing.type].toLowerCase(),
            wallClock(new Date(), tz).hm,
            `${dayAndTime(existing.startsAt, tz)} to ${dayAndTime(existing.endsAt, tz)}`,
          )}
          onClose={() => setConfirming(null)}
          onDone={() => {
            const action = confirming;
            setConfirming(null);
            p.onAction(action, existing);
          }}
        />
      )}
    </dialog>
  );
}
