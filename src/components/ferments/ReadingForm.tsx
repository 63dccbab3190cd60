import { useState, type FormEvent, type ReactNode } from 'react';
import {
  READING_METHOD_LABELS,
  READING_METHODS,
  READING_UNIT_LABELS,
  READING_UNITS,
  type ReadingMethod,
  type ReadingUnit,
  type TemperatureUnit,
} from '../../lib/vocabulary';

export interface ReadingFormProps {
  fermentId: number;
  code: string;
  tempUnit: TemperatureUnit;
  timeZone: string;
  /** Present when editing an existing reading. */
  readingId?: number;
  initial: { value: string; unit: ReadingUnit; method: ReadingMethod; sampleTemp: string; takenAt: string; note: string; fermentTemp: string; ph: string };
}

const num = (s: string): number | null => (s.trim() === '' ? null : Number(s.trim().replace(',', '.')));

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
  const [v, setV] = useState(p.initial);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState('');
  const [busy, setBusy] = useState(false);
  const set = <K extends keyof typeof v>(k: K, value: (typeof v)[K]) => setV((old) => ({ ...old, [k]: value }));

  async function submit(e: FormEvent) {
    e.preventDefault();
    const local: Record<string, string> = {};
    const value = num(v.value);
    if (value === null || !Number.isFinite(value)) local.value = 'Enter the reading as a number, e.g. 1.012.';
    const sampleTemp = num(v.sampleTemp);
    if (sampleTemp !== null && !Number.isFinite(sampleTemp)) local.sampleTemp = 'Enter the temperature as a number.';
    if (v.method === 'hydrometer' && sampleTemp === null) local.sampleTemp = 'A hydrometer reading needs the sample temperature.';
    const fermentTemp = num(v.fermentTemp);
    const ph = num(v.ph);
    if (fermentTemp !== null && !Number.isFinite(fermentTemp)) local.fermentTemp = 'Enter the temperature as a number.';
    if (ph !== null && !Number.isFinite(ph)) local.ph = 'Enter the pH as a number.';
    setErrors(local);
    if (Object.keys(local).length) {
      setMessage('Check the fields marked below.');
      return;
    }
    setBusy(true);
    setMessage('');
    const body = { value, unit: v.unit, method: v.method, sampleTemp, takenAt: v.takenAt || null, note: v.note.trim() || null, fermentTemp, ph };
    try {
      const res = await fetch(p.readingId ? `/api/readings/${p.readingId}` : `/api/ferments/${p.fermentId}/readings`, {
        method: p.readingId ? 'PATCH' : 'POST',
        headers: { 'content-type': 'application/json', accept: 'application/json' },
        body: JSON.stringify(body),
      });
      const data = await res.json().catch(() => null);
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
        onChange={(m) => setV((o) => ({ ...o, method: m, unit: m === 'refractometer' && o.unit === 'sg' ? 'brix' : o.unit }))}
        options={READING_METHODS.map((m) => [m, READING_METHOD_LABELS[m]])}
      />
      <Choice legend="Unit" name="unit" value={v.unit} onChange={(u) => set('unit', u)} options={READING_UNITS.map((u) => [u, READING_UNIT_LABELS[u]])} />
      <div className="field">
        <label htmlFor="value">{valueLabel}</label>
        <input
          id="value"
          className={big}
          inputMode="decimal"
          autoComplete="off"
          placeholder={v.unit === 'sg' ? '1.012' : '8.5'}
          value={v.value}
          onChange={(e) => set('value', e.target.value)}
          {...aria('value')}
        />
        {err('value')}
      </div>
      <div className="field">
        <label htmlFor="sampleTemp">
          Sample temperature (°{p.tempUnit}){v.method === 'hydrometer' ? '' : ' – optional'}
        </label>
        <input
          id="sampleTemp"
          className={big}
          inputMode="decimal"
          autoComplete="off"
          placeholder={p.tempUnit === 'F' ? '68' : '20'}
          value={v.sampleTemp}
          onChange={(e) => set('sampleTemp', e.target.value)}
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
            <input
              id="fermentTemp"
              className="input text-lg"
              inputMode="decimal"
              autoComplete="off"
              value={v.fermentTemp}
              onChange={(e) => set('fermentTemp', e.target.value)}
              {...aria('fermentTemp')}
            />
            {err('fermentTemp')}
          </div>
          <div className="field">
            <label htmlFor="ph">pH</label>
            <input
              id="ph"
              className="input text-lg"
              inputMode="decimal"
              autoComplete="off"
              value={v.ph}
              onChange={(e) => set('ph', e.target.value)}
              {...aria('ph')}
            />
            {err('ph')}
          </div>
        </div>
      </details>
      <p role="status" aria-live="polite" className={Object.keys(errors).length ? 'field-error font-semibold' : ''} data-testid="form-message">
        {message}
      </p>
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
