/** Managers' editor for stills: charge, heating, hours per weekday, cleaning, typical minutes, order, closures. */
import { useState } from 'react';
import type { BoardStill } from '../../lib/board';
import { RUN_TYPE_LABELS, WEEKDAY_NAMES } from '../../lib/board';
import { closesNextDay, type RunType } from '../../lib/schedule';
import { formatVolume, parseVolumeToLitres, volumeForDisplay, volumeUnitFor, type UnitSystem } from '../../lib/units';
import NumberField, { readNumber, refuseUnread, typedText, type NumberFormat } from '../forms/NumberField';
import { RUN_TYPES, STILL_KIND_LABELS, STILL_KINDS, type StillKind } from '../../lib/vocabulary';
import FieldError from '../forms/FieldError';
import { useFieldErrors } from '../forms/useFieldErrors';

type Still = BoardStill & { active: boolean };
interface Closure {
  id: number;
  stillId: number | null;
  startsOn: string;
  endsOn: string;
  reason: string;
}

const WEEK = [1, 2, 3, 4, 5, 6, 0];

/** What the stills API answers: the changed still or the lists, or an error. */
interface StillsAnswer {
  still?: Still;
  stills?: Still[];
  closures?: Closure[];
  removed?: 'deleted' | 'retired';
  error?: { message?: string; fields?: Record<string, string> };
}

async function send(method: string, url: string, body?: unknown): Promise<{ ok: boolean; json: StillsAnswer }> {
  const res = await fetch(url, {
    method,
    headers: { 'content-type': 'application/json', accept: 'application/json' },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await res.text();
  return { ok: res.ok, json: text ? JSON.parse(text) : null };
}

interface Draft {
  name: string;
  kind: StillKind;
  capacity: string;
  heatingKw: string;
  cleaning: string;
  hours: Record<number, { open: string; close: string } | null>;
  typical: Record<RunType, string>;
}

/** Under a day's hours: an overnight shift closes the next day (22:00 to 06:00); the same time for both is not a shift. */
function hoursNote(h: { open: string; close: string }): string {
  const close = h.close === '00:00' ? '24:00' : h.close;
  if (!/^\d{2}:\d{2}$/.test(h.open) || !/^\d{2}:\d{2}$/.test(close)) return '';
  if (close === h.open) return 'opens and closes at the same time: use midnight to midnight for round the clock';
  return closesNextDay({ open: h.open, close }) ? 'closes next day' : '';
}

function draftOf(s: Still | null, units: UnitSystem, format: NumberFormat): Draft {
  const hours: Draft['hours'] = {};
  for (const d of WEEK) {
    const h = s?.operatingHours.find((x) => x.weekday === d);
    hours[d] = s ? (h ? { open: h.open, close: h.close } : null) : d >= 1 && d <= 5 ? { open: '06:00', close: '22:00' } : null;
  }
  return {
    name: s?.name ?? '',
    kind: s?.kind ?? 'pot',
    capacity: s ? typedText(Math.round(volumeForDisplay(s.capacityLitres, units)), format) : '',
    heatingKw: s ? typedText(s.heatingKw, format) : '',
    cleaning: String(s?.cleaningAfterRunMinutes ?? 60),
    hours,
    typical: Object.fromEntries(
      RUN_TYPES.map((t) => [t, String(s?.typicalMinutes[t] ?? { stripping: 300, spirit: 480, redistillation: 420, cleaning: 120, maintenance: 240 }[t])]),
    ) as Record<RunType, string>,
  };
}

function StillForm({
  still,
  units,
  numberFormat,
  onDone,
}: {
  still: Still | null;
  units: UnitSystem;
  numberFormat: NumberFormat;
  onDone: (s: Still | null) => void;
}) {
  const [d, setD] = useState<Draft>(() => draftOf(still, units, numberFormat));
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const { attach: fieldsRef, ...fe } = useFieldErrors();
  const idp = `sf-${still?.id ?? 'new'}`;
  async function save(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    // Numbers are read by the distillery's format; one that cannot be read is refused beside its field, nothing is sent.
    const typed: Record<string, [string, string]> = {
      capacityLitres: [d.capacity, `${idp}-cap`],
      heatingKw: [d.heatingKw, `${idp}-kw`],
      cleaningAfterRunMinutes: [d.cleaning, `${idp}-clean`],
      ...Object.fromEntries(RUN_TYPES.map((t) => [`typicalMinutes.${t}`, [d.typical[t], `${idp}-t-${t}`]])),
    };
    const read = Object.fromEntries(Object.entries(typed).map(([k, [text]]) => [k, readNumber(text, numberFormat)]));
    const refused = refuseUnread(Object.entries(typed).map(([k, [, inputId]]) => [inputId, read[k]!]));
    if (refused) {
      setError(refused);
      return;
    }
    const n = (k: string) => (read[k]!.ok ? (read[k] as { value: number | null }).value : null);
    setBusy(true);
    const capacity = n('capacityLitres');
    const body = {
      name: d.name,
      kind: d.kind,
      capacityLitres: capacity === null ? null : parseVolumeToLitres(capacity, volumeUnitFor(units)),
      heatingKw: n('heatingKw'),
      cleaningAfterRunMinutes: n('cleaningAfterRunMinutes'),
      operatingHours: WEEK.flatMap((w) =>
        d.hours[w] ? [{ weekday: w, open: d.hours[w]!.open, close: d.hours[w]!.close === '00:00' ? '24:00' : d.hours[w]!.close }] : [],
      ),
      typicalMinutes: Object.fromEntries(RUN_TYPES.map((t) => [t, n(`typicalMinutes.${t}`)])),
    };
    const r = still ? await send('PATCH', `/api/stills/${still.id}`, body) : await send('POST', '/api/stills', body);
    setBusy(false);
    if (r.ok) onDone(r.json.still ?? null);
    // Each message beside its field (the first one focused); the box says only what is not beside a field.
    else setError(fe.fromAnswer(r.json?.error, { fallback: 'Not saved.' }) || null);
  }
  const set = (patch: Partial<Draft>) => setD({ ...d, ...patch });
  return (
    <form ref={fieldsRef} onSubmit={save} noValidate className="mt-2 flex flex-col gap-3 rounded border border-line p-3">
      {error && (
        <p className="field-error" role="alert">
          {error}
        </p>
      )}
      <div className="grid grid-cols-1 gap-3 sm:grid-cols-3">
        <div className="field">
          <label htmlFor={`${idp}-name`}>Name</label>
          <input id={`${idp}-name`} className="input" value={d.name} onChange={(e) => set({ name: e.target.value })} required maxLength={80} />
          <FieldError {...fe.error('name', `${idp}-name`)} />
        </div>
        <div className="field">
          <label htmlFor={`${idp}-kind`}>Kind</label>
          <select id={`${idp}-kind`} className="input" value={d.kind} onChange={(e) => set({ kind: e.target.value as Draft['kind'] })}>
            {STILL_KINDS.map((k) => (
              <option key={k} value={k}>
                {STILL_KIND_LABELS[k]}
              </option>
            ))}
          </select>
          <FieldError {...fe.error('kind', `${idp}-kind`)} />
        </div>
        <div className="field">
          <label htmlFor={`${idp}-cap`}>Working charge ({volumeUnitFor(units) === 'L' ? 'litres' : 'US gallons'})</label>
          <NumberField
            id={`${idp}-cap`}
            format={numberFormat}
            unit={volumeUnitFor(units)}
            value={d.capacity}
            onValueChange={(capacity) => set({ capacity })}
            required
          />
          <FieldError {...fe.error('capacityLitres', `${idp}-cap`)} />
        </div>
        <div className="field">
          <label htmlFor={`${idp}-kw`}>Heating power (kW)</label>
          <NumberField id={`${idp}-kw`} format={numberFormat} unit="kW" value={d.heatingKw} onValueChange={(heatingKw) => set({ heatingKw })} required />
          <FieldError {...fe.error('heatingKw', `${idp}-kw`)} />
        </div>
        <div className="field">
          <label htmlFor={`${idp}-clean`}>Cleaning after each run (min, 0 = none)</label>
          <NumberField id={`${idp}-clean`} format={numberFormat} unit="min" value={d.cleaning} onValueChange={(cleaning) => set({ cleaning })} required />
          <FieldError {...fe.error('cleaningAfterRunMinutes', `${idp}-clean`)} />
        </div>
      </div>
      <fieldset>
        <legend className="label">Operating hours</legend>
        <div className="mt-1 grid grid-cols-1 gap-1 sm:grid-cols-2">
          {WEEK.map((w) => (
            <div key={w} className="flex flex-wrap items-center gap-2">
              <label className="flex w-32 items-center gap-1">
                <input
                  type="checkbox"
                  checked={!!d.hours[w]}
                  onChange={(e) => set({ hours: { ...d.hours, [w]: e.target.checked ? { open: '06:00', close: '22:00' } : null } })}
                />{' '}
                {WEEKDAY_NAMES[w]}
              </label>
              {d.hours[w] && (
                <>
                  <label className="sr-only" htmlFor={`${idp}-o${w}`}>
                    {WEEKDAY_NAMES[w]} opens
                  </label>
                  <input
                    id={`${idp}-o${w}`}
                    className="input"
                    type="time"
                    value={d.hours[w]!.open}
                    onChange={(e) => set({ hours: { ...d.hours, [w]: { ...d.hours[w]!, open: e.target.value } } })}
                  />
                  <span aria-hidden="true">to</span>
                  <label className="sr-only" htmlFor={`${idp}-c${w}`}>
                    {WEEKDAY_NAMES[w]} closes (00:00 = midnight; before the opening time = the next day)
                  </label>
                  <input
                    id={`${idp}-c${w}`}
                    className="input"
                    type="time"
                    value={d.hours[w]!.close === '24:00' ? '00:00' : d.hours[w]!.close}
                    onChange={(e) => set({ hours: { ...d.hours, [w]: { ...d.hours[w]!, close: e.target.value } } })}
                    aria-describedby={`${idp}-n${w}`}
                  />
                  <span id={`${idp}-n${w}`} className="text-xs text-ink-soft" aria-live="polite">
                    {hoursNote(d.hours[w]!)}
                  </span>
                </>
              )}
            </div>
          ))}
        </div>
      </fieldset>
      <fieldset>
        <legend className="label">Typical minutes once at the boil, by run type</legend>
        <div className="mt-1 grid grid-cols-2 gap-2 sm:grid-cols-5">
          {RUN_TYPES.map((t) => (
            <div key={t} className="field">
              <label htmlFor={`${idp}-t-${t}`}>{RUN_TYPE_LABELS[t]}</label>
              <NumberField
                id={`${idp}-t-${t}`}
                format={numberFormat}
                unit="min"
                value={d.typical[t]}
                onValueChange={(text) => set({ typical: { ...d.typical, [t]: text } })}
              />
              <FieldError {...fe.error(`typicalMinutes.${t}`, `${idp}-t-${t}`)} />
            </div>
          ))}
        </div>
      </fieldset>
      <div className="flex gap-2">
        <button type="submit" className="btn" disabled={busy}>
          {still ? 'Save still' : 'Add still'}
        </button>
        <button type="button" className="btn btn-quiet" onClick={() => onDone(null)}>
          Close
        </button>
      </div>
    </form>
  );
}

export default function StillsEditor(props: { initial: Still[]; closures: Closure[]; units: UnitSystem; numberFormat?: NumberFormat }) {
  const numberFormat = props.numberFormat ?? 'point';
  const [stills, setStills] = useState(props.initial);
  const [closures, setClosures] = useState(props.closures);
  const [editing, setEditing] = useState<number | 'new' | null>(null);
  const [msg, setMsg] = useState<string | null>(null);
  const [c, setC] = useState({ stillId: '', startsOn: '', endsOn: '', reason: '' });

  async function reload() {
    const [s, cl] = await Promise.all([send('GET', '/api/stills'), send('GET', '/api/stills/closures')]);
    if (s.ok) setStills(s.json.stills ?? []);
    if (cl.ok) setClosures(cl.json.closures ?? []);
  }
  async function move(id: number, dir: -1 | 1) {
    const active = stills.filter((s) => s.active).map((s) => s.id);
    const i = active.indexOf(id);
    const j = i + dir;
    if (j < 0 || j >= active.length) return;
    [active[i], active[j]] = [active[j]!, active[i]!];
    const r = await send('PUT', '/api/stills/order', { ids: active });
    if (r.ok) {
      setStills(r.json.stills ?? []);
      setMsg('Board order saved.');
    }
  }
  async function retire(s: Still) {
    if (!window.confirm(`Remove ${s.name} from the board? Its past runs stay on record.`)) return;
    const r = await send('DELETE', `/api/stills/${s.id}`);
    setMsg(r.ok ? `${s.name} ${r.json.removed === 'deleted' ? 'deleted' : 'retired'}.` : (r.json?.error?.message ?? 'Not removed.'));
    await reload();
  }
  async function addClosure(e: React.FormEvent) {
    e.preventDefault();
    const r = await send('POST', '/api/stills/closures', {
      stillId: c.stillId ? Number(c.stillId) : null,
      startsOn: c.startsOn,
      endsOn: c.endsOn || c.startsOn,
      reason: c.reason,
    });
    setMsg(r.ok ? 'Closure added.' : (r.json?.error?.message ?? 'Not added.'));
    if (r.ok) {
      setC({ stillId: '', startsOn: '', endsOn: '', reason: '' });
      await reload();
    }
  }
  async function removeClosure(id: number) {
    const res = await fetch(`/api/stills/closures/${id}`, { method: 'DELETE' });
    if (res.ok) await reload();
  }
  const name = (id: number | null) => (id === null ? 'Whole distillery' : (stills.find((s) => s.id === id)?.name ?? '?'));
  const active = stills.filter((s) => s.active);
  return (
    <div className="flex flex-col gap-3">
      <p role="status" className="text-sm text-ink-soft">
        {msg}
      </p>
      <ul className="flex flex-col gap-2">
        {active.map((s, i) => (
          <li key={s.id} className="rounded border border-line p-2" data-testid={`still-${s.id}`}>
            <div className="flex flex-wrap items-center gap-2">
              <strong>{s.name}</strong>
              <span className="text-sm text-ink-soft">
                {s.kind} · {formatVolume(s.capacityLitres, props.units)} · {s.heatingKw} kW · cleaning {s.cleaningAfterRunMinutes} min ·{' '}
                {s.operatingHours.length
                  ? s.operatingHours
                      .map((h) => `${WEEKDAY_NAMES[h.weekday]!.slice(0, 3)} ${h.open}–${h.close}${closesNextDay(h) ? ' (next day)' : ''}`)
                      .join(', ')
                  : 'no hours set'}
              </span>
              <span className="ml-auto flex gap-1">
                <button type="button" className="btn btn-quiet" onClick={() => move(s.id, -1)} disabled={i === 0} aria-label={`Move ${s.name} up the board`}>
                  ↑
                </button>
                <button
                  type="button"
                  className="btn btn-quiet"
                  onClick={() => move(s.id, 1)}
                  disabled={i === active.length - 1}
                  aria-label={`Move ${s.name} down the board`}
                >
                  ↓
                </button>
                <button type="button" className="btn btn-quiet" onClick={() => setEditing(editing === s.id ? null : s.id)} aria-expanded={editing === s.id}>
                  Edit
                </button>
                <button type="button" className="btn btn-quiet" onClick={() => retire(s)}>
                  Remove
                </button>
              </span>
            </div>
            {editing === s.id && (
              <StillForm
                still={s}
                units={props.units}
                numberFormat={numberFormat}
                onDone={(saved) => {
                  setEditing(null);
                  if (saved) {
                    setMsg(`${saved.name} saved.`);
                    void reload();
                  }
                }}
              />
            )}
          </li>
        ))}
      </ul>
      {editing === 'new' ? (
        <StillForm
          still={null}
          units={props.units}
          numberFormat={numberFormat}
          onDone={(saved) => {
            setEditing(null);
            if (saved) {
              setMsg(`${saved.name} added.`);
              void reload();
            }
          }}
        />
      ) : (
        <button type="button" className="btn self-start" onClick={() => setEditing('new')}>
          Add a still
        </button>
      )}
      <h3 className="mt-2 font-semibold">Closures</h3>
      <ul className="flex flex-col gap-1 text-sm">
        {closures.length === 0 && <li className="text-ink-soft">No closures.</li>}
        {closures.map((x) => (
          <li key={x.id} className="flex items-center gap-2">
            {x.startsOn}
            {x.endsOn !== x.startsOn ? ` to ${x.endsOn}` : ''} · {name(x.stillId)} · {x.reason}
            <button type="button" className="btn btn-quiet" onClick={() => removeClosure(x.id)} aria-label={`Remove closure ${x.reason} from ${x.startsOn}`}>
              Remove
            </button>
          </li>
        ))}
      </ul>
      <form onSubmit={addClosure} className="grid grid-cols-1 gap-2 sm:grid-cols-5 sm:items-end">
        <div className="field">
          <label htmlFor="cl-still">Still</label>
          <select id="cl-still" className="input" value={c.stillId} onChange={(e) => setC({ ...c, stillId: e.target.value })}>
            <option value="">Whole distillery</option>
            {active.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </select>
        </div>
        <div className="field">
          <label htmlFor="cl-from">First day</label>
          <input id="cl-from" className="input" type="date" value={c.startsOn} onChange={(e) => setC({ ...c, startsOn: e.target.value })} required />
        </div>
        <div className="field">
          <label htmlFor="cl-to">Last day</label>
          <input id="cl-to" className="input" type="date" value={c.endsOn} onChange={(e) => setC({ ...c, endsOn: e.target.value })} />
        </div>
        <div className="field">
          <label htmlFor="cl-why">Why</label>
          <input
            id="cl-why"
            className="input"
            value={c.reason}
            onChange={(e) => setC({ ...c, reason: e.target.value })}
            required
            maxLength={160}
            placeholder="Holiday, boiler service…"
          />
        </div>
        <button type="submit" className="btn">
          Add closure
        </button>
      </form>
    </div>
  );
}
