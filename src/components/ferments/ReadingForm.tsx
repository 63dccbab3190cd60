import { useState, type FormEvent, type ReactNode } from 'react';
import {
  READING_METHOD_LABELS,
  READING_METHODS,
  READING_UNIT_LABELS,
  READING_UNIT_SYMBOLS,
  READING_UNITS,
  type ReadingMethod,
  type ReadingUnit,
  type TemperatureUnit,
} from '../../lib/vocabulary';
import NumberField, { readNumber, refuseUnread, typedText, type NumberFormat } from '../forms/NumberField';

export interface ReadingFormProps {
  fermentId: number;
  code: string;
  tempUnit: TemperatureUnit;
  timeZone: string;
  /** How the distillery types numbers; the initial values are plain numbers ("1.012"). */
  numberFormat?: NumberFormat;
  /** Present when editing an existing reading. */
  readingId?: number;
  initial: { value: string; unit: ReadingUnit; method: ReadingMethod; sampleTemp: string; takenAt: string; note: string; fermentTemp: string; ph: string };
}

/** The server's doubt about a reading (409 confirm_reading): shown with a "save as entered" and, when it has one, the likely unit. */
interface Doubt {
  message: string;
  suggestion: { value: number; unit: ReadingUnit } | null;
}

function Choice<T extends string>({
  legend,
  name,
  value,
  options,
  onChange,
}: {
  legend: string;
  name: string;
  value: T;
  options: Array<[T, string]>;
  onChange: (v: T) => void;
}) {
  return (
    <fieldset>
      <legend className="label">{legend}</legend>
      <div className="mt-1 grid grid-cols-3 gap-2">
        {options.map(([v, label]) => (
          <label
            key={v}
            className={`flex min-h-12 cursor-pointer items-center justify-center rounded-lg border-2 px-2 text-center font-semibold hyphens-auto ${value === v ? 'border-slate-deep bg-slate-deep text-white' : 'border-line bg-panel'}`}
          >
            <input type="radio" name={name} value={v} checked={value === v} onChange={() => onChange(v)} className="sr-only" />
            {label}
          </label>
        ))}
      </div>
    </fieldset>
  );
}

/** Phone-first reading entry: big targets, decimal keyboard, field-level messages from the server. */
export default function ReadingForm(p: ReadingFormProps) {
  const format = p.numberFormat ?? 'point';
  const inFormat = (plain: string) => (plain.trim() === '' ? '' : typedText(Number(plain), format));
  const [v, setV] = useState(() => ({
    ...p.initial,
    value: inFormat(p.initial.value),
    sampleTemp: inFormat(p.initial.sampleTemp),
    fermentTemp: inFormat(p.initial.fermentTemp),
    ph: inFormat(p.initial.ph),
  }));
  const [doubt, setDoubt] = useState<Doubt | null>(null);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState('');
  const [busy, setBusy] = useState(false);
  const set = <K extends keyof typeof v>(k: K, value: (typeof v)[K]) => {
    setDoubt(null);
    setV((old) => ({ ...old, [k]: value }));
  };
  // Gravity, temperatures and pH never carry thousands: "1.012" in comma format is refused ("did you mean 1,012?").
  const read = (text: string, negative = false) => readNumber(text, format, { grouping: false, negative });

  async function submit(e: FormEvent, confirm = false) {
    e.preventDefault();
    const local: Record<string, string> = {};
    const value = read(v.value);
    const sampleTemp = read(v.sampleTemp, true);
    const fermentTemp = read(v.fermentTemp, true);
    const ph = read(v.ph);
    const unread = refuseUnread([
      ['value', value],
      ['sampleTemp', sampleTemp],
      ['fermentTemp', fermentTemp],
      ['ph', ph],
    ]);
    if (unread) {
      setErrors({});
      setMessage(unread);
      return;
    }
    const n = (r: typeof value) => (r.ok ? r.value : null);
    if (n(value) === null) local.value = `Enter the reading as a number, e.g. ${typedText(1.012, format, 3)}.`;
    if (v.method === 'hydrometer' && n(sampleTemp) === null) local.sampleTemp = 'A hydrometer reading needs the sample temperature.';
    setErrors(local);
    if (Object.keys(local).length) {
      setMessage('Check the fields marked below.');
      return;
    }
    setBusy(true);
    setMessage('');
    setDoubt(null);
    const body = {
      value: n(value),
      unit: v.unit,
      method: v.method,
      sampleTemp: n(sampleTemp),
      takenAt: v.takenAt || null,
      note: v.note.trim() || null,
      fermentTemp: n(fermentTemp),
      ph: n(ph),
      ...(confirm ? { confirm: true } : {}),
    };
    try {
      const res = await fetch(p.readingId ? `/api/readings/${p.readingId}` : `/api/ferments/${p.fermentId}/readings`, {
        method: p.readingId ? 'PATCH' : 'POST',
        headers: { 'content-type': 'application/json', accept: 'application/json' },
        body: JSON.stringify(body),
      });
      const data = await res.json().catch(() => null);
      if (res.status === 409 && data?.error?.code === 'confirm_reading') {
        // Held: the person sees what was entered (value and unit) and confirms, or corrects it.
        setErrors({});
        setDoubt({ message: data.error.message, suggestion: data.confirm?.suggestion ?? null });
        return;
      }
      if (!res.ok) {
        setErrors(data?.error?.fields ?? {});
        setMessage(data?.error?.message ?? 'The reading was not saved.');
        return;
      }
      window.location.assign(`/ferments/${p.fermentId}?logged=${data.reading.id}#readings`);
    } catch {
      setMessage('No connection: the reading was not saved. Try again.');
    } finally {
      setBusy(false);
    }
  }

  async function remove() {
    if (!p.readingId || !window.confirm('Delete this reading? It stays in the audit log.')) return;
    const res = await fetch(`/api/readings/${p.readingId}`, { method: 'DELETE' }).catch(() => null);
    if (res?.status === 204) window.location.assign(`/ferments/${p.fermentId}#readings`);
    else setMessage('Could not delete the reading.');
  }

  const err = (k: string): ReactNode =>
    errors[k] ? (
      <p id={`${k}-error`} className="field-error" data-testid={`error-${k}`}>
        {errors[k]}
      </p>
    ) : null;
  const aria = (k: string) => ({ 'aria-invalid': !!errors[k], 'aria-describedby': errors[k] ? `${k}-error` : undefined });
  const big = 'input text-2xl font-semibold tabular-nums';
  const valueLabel = v.unit === 'sg' ? 'Gravity (SG)' : v.unit === 'brix' ? 'Reading (°Brix)' : 'Reading (°Plato)';

  return (
    <form onSubmit={submit} noValidate className="mt-3 flex max-w-md flex-col gap-4" aria-label={p.readingId ? 'Edit reading' : 'Log a reading'}>
      <Choice
        legend="Instrument"
        name="method"
        value={v.method}
        onChange={(m) => {
          setDoubt(null);
          setV((o) => ({ ...o, method: m, unit: m === 'refractometer' && o.unit === 'sg' ? 'brix' : o.unit }));
        }}
        options={READING_METHODS.map((m) => [m, READING_METHOD_LABELS[m]])}
      />
      <Choice legend="Unit" name="unit" value={v.unit} onChange={(u) => set('unit', u)} options={READING_UNITS.map((u) => [u, READING_UNIT_LABELS[u]])} />
      <div className="field">
        <label htmlFor="value">{valueLabel}</label>
        <NumberField
          id="value"
          className={big}
          format={format}
          grouping={false}
          unit={READING_UNIT_SYMBOLS[v.unit]}
          placeholder={v.unit === 'sg' ? typedText(1.012, format, 3) : typedText(8.5, format, 1)}
          value={v.value}
          onValueChange={(text) => set('value', text)}
          {...aria('value')}
        />
        {err('value')}
      </div>
      <div className="field">
        <label htmlFor="sampleTemp">
          Sample temperature (°{p.tempUnit}){v.method === 'hydrometer' ? '' : ' – optional'}
        </label>
        <NumberField
          id="sampleTemp"
          className={big}
          format={format}
          grouping={false}
          negative
          unit={`°${p.tempUnit}`}
          placeholder={p.tempUnit === 'F' ? '68' : '20'}
          value={v.sampleTemp}
          onValueChange={(text) => set('sampleTemp', text)}
          {...aria('sampleTemp')}
        />
        {err('sampleTemp')}
      </div>
      <div className="field">
        <label htmlFor="takenAt">Time ({p.timeZone})</label>
        <input
          id="takenAt"
          type="datetime-local"
          className="input text-lg"
          value={v.takenAt}
          onChange={(e) => set('takenAt', e.target.value)}
          {...aria('takenAt')}
        />
        {err('takenAt')}
      </div>
      <div className="field">
        <label htmlFor="note">Note – optional</label>
        <input id="note" className="input" value={v.note} maxLength={500} onChange={(e) => set('note', e.target.value)} {...aria('note')} />
        {err('note')}
      </div>
      <details open={!!(v.fermentTemp || v.ph || errors.fermentTemp || errors.ph)}>
        <summary className="min-h-11 cursor-pointer py-2 font-semibold">Ferment temperature and pH</summary>
        <div className="mt-2 grid grid-cols-2 gap-3">
          <div className="field">
            <label htmlFor="fermentTemp">Wash temp (°{p.tempUnit})</label>
            <NumberField
              id="fermentTemp"
              className="input text-lg"
              format={format}
              grouping={false}
              negative
              unit={`°${p.tempUnit}`}
              value={v.fermentTemp}
              onValueChange={(text) => set('fermentTemp', text)}
              {...aria('fermentTemp')}
            />
            {err('fermentTemp')}
          </div>
          <div className="field">
            <label htmlFor="ph">pH</label>
            <NumberField
              id="ph"
              className="input text-lg"
              format={format}
              grouping={false}
              unit="pH"
              value={v.ph}
              onValueChange={(text) => set('ph', text)}
              {...aria('ph')}
            />
            {err('ph')}
          </div>
        </div>
      </details>
      <p role="status" aria-live="polite" className={Object.keys(errors).length ? 'field-error font-semibold' : ''} data-testid="form-message">
        {message}
      </p>
      {doubt && (
        <div role="alert" className="rounded border-l-4 border-ember bg-ember-soft p-3 text-ink" data-testid="reading-doubt">
          <p className="font-semibold">Check this reading</p>
          <p className="mt-1">{doubt.message}</p>
          <div className="mt-3 flex flex-col gap-2">
            <button type="button" className="btn min-h-12 justify-center" disabled={busy} onClick={(e) => void submit(e, true)}>
              Save as entered ({v.value} {READING_UNIT_SYMBOLS[v.unit]})
            </button>
            {doubt.suggestion && (
              <button
                type="button"
                className="btn btn-quiet min-h-12 justify-center"
                onClick={() => {
                  const s = doubt.suggestion!;
                  setV((old) => ({ ...old, value: typedText(s.value, format, s.unit === 'sg' ? 3 : undefined), unit: s.unit }));
                  setDoubt(null);
                  document.getElementById('value')?.focus();
                }}
              >
                Change to {typedText(doubt.suggestion.value, format, doubt.suggestion.unit === 'sg' ? 3 : undefined)}{' '}
                {READING_UNIT_SYMBOLS[doubt.suggestion.unit]}
              </button>
            )}
          </div>
        </div>
      )}
      <button className="btn min-h-14 w-full justify-center text-lg" type="submit" disabled={busy}>
        {busy ? 'Saving…' : p.readingId ? 'Save changes' : 'Save reading'}
      </button>
      {p.readingId && (
        <button type="button" className="btn btn-danger w-full justify-center" onClick={remove}>
          Delete reading
        </button>
      )}
      <a href={`/ferments/${p.fermentId}`} className="text-center">
        Back to {p.code}
      </a>
    </form>
  );
}
