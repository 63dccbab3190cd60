import { useMemo, useState, type FormEvent } from 'react';
import { AlcoholInputError, alcoholmeterCorrection, laa, laaToProofGallons } from '../../lib/alcohol';
import { FRACTION_LABELS, READING_TEMP_MAX_C, READING_TEMP_MIN_C, type Fraction } from '../../lib/reports';
import { celsiusToFahrenheit, fahrenheitToCelsius, usGallonsToLitres, type UnitSystem } from '../../lib/units';
import NumberField, { readNumber, refusalOf, refuseUnread, typedText, type NumberFormat } from '../forms/NumberField';

export interface RecordFractionInit {
  fraction: Fraction;
  volume: string;
  reading: string;
  temp: string;
  cutNote: string;
}

export interface RunRecordFormProps {
  runId: number;
  version: number;
  status: 'running' | 'done';
  units: UnitSystem;
  /** How the distillery types numbers; the initial charge and fraction figures are plain numbers ("1200.5"). */
  numberFormat?: NumberFormat;
  stillCapacityLitres: number;
  allowed: Fraction[];
  charge: { volume: string; abv: string };
  fractions: RecordFractionInit[];
  expectedLaa: number | null;
}

/** Which fields may carry thousands (volumes) and a minus (temperatures); strengths never carry thousands. */
type Kind = 'volume' | 'strength' | 'temp';
const READ_OPTIONS: Record<Kind, { grouping: boolean; negative: boolean }> = {
  volume: { grouping: true, negative: false },
  strength: { grouping: false, negative: false },
  temp: { grouping: false, negative: true },
};
const f1 = (n: number) => n.toLocaleString('en-GB', { minimumFractionDigits: 1, maximumFractionDigits: 1 });
const f2 = (n: number) => n.toLocaleString('en-GB', { minimumFractionDigits: 2, maximumFractionDigits: 2 });

const HINTS: Partial<Record<Fraction, string>> = {
  heads: 'Heads are discarded: they carry methanol and other volatiles. Record them, never blend them.',
  feints: 'Feints kept for a later spirit run.',
  low_wines: 'Everything collected off the stripping run.',
};

/** Phone-first run record: the distiller's own cuts, corrected to 20 °C as they type. */
export default function RunRecordForm(p: RunRecordFormProps) {
  const format = p.numberFormat ?? 'point';
  /** A field's text read by the distillery's format: null when empty, NaN when it cannot be read (refused beside the field). */
  const num = (text: string, kind: Kind): number | null => {
    const r = readNumber(text, format, READ_OPTIONS[kind]);
    return r.ok ? r.value : NaN;
  };
  const inFormat = (plain: string) => (plain.trim() === '' ? '' : typedText(Number(plain), format));
  const us = p.units === 'us';
  const volUnit = us ? 'gal' : 'L';
  const tempUnit = us ? '°F' : '°C';
  const toL = (v: number) => (us ? usGallonsToLitres(v) : v);
  const toC = (t: number) => (us ? fahrenheitToCelsius(t) : t);
  const [charge, setCharge] = useState(() => ({ volume: inFormat(p.charge.volume), abv: inFormat(p.charge.abv) }));
  const [rows, setRows] = useState<RecordFractionInit[]>(() =>
    p.allowed.map((fraction) => {
      const f = p.fractions.find((x) => x.fraction === fraction);
      return f
        ? { ...f, volume: inFormat(f.volume), reading: inFormat(f.reading), temp: inFormat(f.temp) }
        : { fraction, volume: '', reading: '', temp: '', cutNote: '' };
    }),
  );
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState('');
  const [busy, setBusy] = useState(false);
  const [version, setVersion] = useState(p.version);
  const [status, setStatus] = useState(p.status);

  /** Typing in a field clears its message (the check runs again on save). */
  const clearError = (key: string) =>
    setErrors((old) => {
      if (!(key in old)) return old;
      const { [key]: _gone, ...rest } = old;
      return rest;
    });
  const setRow = (i: number, k: keyof RecordFractionInit, value: string) => {
    setRows((old) => old.map((r, j) => (j === i ? { ...r, [k]: value } : r)));
    clearError(`${rows[i]!.fraction}.${k}`);
  };

  const live = useMemo(
    () =>
      rows.map((r) => {
        const v = num(r.volume, 'volume');
        const rd = num(r.reading, 'strength');
        const t = num(r.temp, 'temp');
        if (v === null || rd === null || t === null || ![v, rd, t].every(Number.isFinite)) return null;
        try {
          const abv20 = alcoholmeterCorrection(rd, toC(t));
          const l = laa(toL(v), abv20);
          return { abv20, laa: l, pg: laaToProofGallons(l) };
        } catch (err) {
          if (err instanceof AlcoholInputError) return null;
          throw err;
        }
      }),
    // toL and toC are fixed by `us`, num by the format.
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [rows, us],
  );
  const collected = live.reduce((s, x) => s + (x?.laa ?? 0), 0);
  const cv = num(charge.volume, 'volume');
  const ca = num(charge.abv, 'strength');
  const charged = cv !== null && ca !== null && Number.isFinite(cv) && Number.isFinite(ca) && cv >= 0 && ca >= 0 && ca <= 100 ? laa(toL(cv), ca) : null;

  function collect(): { body: unknown | null; local: Record<string, string>; unread?: string } {
    const local: Record<string, string> = {};
    // A number that cannot be read is refused beside its field: focus it and send nothing.
    const unread = refuseUnread([
      ['charge-volume', readNumber(charge.volume, format, READ_OPTIONS.volume)],
      ['charge-abv', readNumber(charge.abv, format, READ_OPTIONS.strength)],
      ...rows.flatMap((r) =>
        (
          [
            ['volume', 'volume'],
            ['reading', 'strength'],
            ['temp', 'temp'],
          ] as const
        ).map(([f, kind]) => [`${r.fraction}-${f}`, readNumber(r[f], format, READ_OPTIONS[kind])] as [string, ReturnType<typeof readNumber>]),
      ),
    ]);
    if (unread) return { body: null, local, unread };
    if (cv !== null && !Number.isFinite(cv)) local.chargeLitres = 'Enter the charge volume as a number.';
    if (ca !== null && !Number.isFinite(ca)) local.chargeAbv = 'Enter the charge strength as a number.';
    const tMin = us ? celsiusToFahrenheit(READING_TEMP_MIN_C) : READING_TEMP_MIN_C;
    const tMax = us ? celsiusToFahrenheit(READING_TEMP_MAX_C) : READING_TEMP_MAX_C;
    const fractions: unknown[] = [];
    rows.forEach((r) => {
      const blank = [r.volume, r.reading, r.temp].every((s) => s.trim() === '') && r.cutNote.trim() === '';
      if (blank) return;
      const v = num(r.volume, 'volume');
      const rd = num(r.reading, 'strength');
      const t = num(r.temp, 'temp');
      if (v === null || !Number.isFinite(v)) local[`${r.fraction}.volume`] = 'Enter the volume collected.';
      if (rd === null || !Number.isFinite(rd)) local[`${r.fraction}.reading`] = 'Enter the alcoholmeter reading (% vol).';
      if (t === null || !Number.isFinite(t)) local[`${r.fraction}.temp`] = `Enter the temperature the reading was taken at (${tempUnit}).`;
      else if (t < tMin || t > tMax)
        local[`${r.fraction}.temp`] = `Reading temperature must be between ${Math.round(tMin)} and ${Math.round(tMax)} ${tempUnit}.`;
      fractions.push({
        fraction: r.fraction,
        volumeLitres: v === null ? null : toL(v),
        alcoholmeterReading: rd,
        readingTempC: t === null ? null : toC(t),
        cutNote: r.cutNote.trim() || null,
      });
    });
    if (Object.keys(local).length) return { body: null, local };
    return { body: { version, chargeLitres: cv === null ? null : toL(cv), chargeAbv: ca, fractions }, local };
  }

  /** Server field keys ('fractions.1.readingTempC') back to the row they belong to. */
  function mapServerErrors(fields: Record<string, string>, sent: Array<{ fraction: Fraction }>): Record<string, string> {
    const out: Record<string, string> = {};
    const names: Record<string, string> = {
      volumeLitres: 'volume',
      alcoholmeterReading: 'reading',
      readingTempC: 'temp',
      cutNote: 'cutNote',
      fraction: 'reading',
    };
    for (const [key, msg] of Object.entries(fields)) {
      const m = /^fractions\.(\d+)\.(\w+)$/.exec(key);
      if (m) {
        const fr = sent[Number(m[1])]?.fraction;
        if (fr) out[`${fr}.${names[m[2]!] ?? m[2]}`] = msg;
      } else out[key] = msg;
    }
    return out;
  }

  async function submit(e: FormEvent, finish: boolean) {
    e.preventDefault();
    const { body, local, unread } = collect();
    setErrors(local);
    if (!body) {
      setMessage(unread ?? 'Check the fields marked below.');
      return;
    }
    if (finish && !window.confirm('Mark this run done now? The still must be shut down and safe.')) return;
    setBusy(true);
    setMessage('');
    try {
      const payload = { ...(body as object), ...(finish ? { finish: true } : {}) };
      const res = await fetch(`/api/runs/${p.runId}/outcomes`, {
        method: 'PUT',
        headers: { 'content-type': 'application/json', accept: 'application/json' },
        body: JSON.stringify(payload),
      });
      const data = await res.json().catch(() => null);
      if (!res.ok) {
        setErrors(mapServerErrors(data?.error?.fields ?? {}, (body as { fractions: Array<{ fraction: Fraction }> }).fractions));
        setMessage(
          res.status === 409
            ? `${data?.error?.message ?? 'The run changed.'} Reload the page to see the latest.`
            : (data?.error?.message ?? 'The record was not saved.'),
        );
        return;
      }
      setVersion(data.record.run.version);
      setStatus(data.record.run.status);
      setMessage(finish ? 'Saved. The run is marked done.' : 'Record saved.');
    } catch {
      setMessage('No connection: the record was not saved. Try again.');
    } finally {
      setBusy(false);
    }
  }

  const err = (k: string) => errors[k];
  const hasErrors = Object.keys(errors).length > 0;
  const shownMessage = message === 'Check the fields marked below.' && !hasErrors ? '' : message;
  const inputCls = (k: string) => `input w-full ${err(k) ? 'border-ember' : ''}`;
  const describedBy = (k: string) => (err(k) ? `${k.replace('.', '-')}-err` : undefined);
  // A plain function, not a component: a component declared in render would remount every time.
  const errorText = (k: string) =>
    err(k) ? (
      <p id={`${k.replace('.', '-')}-err`} className="field-error">
        {err(k)}
      </p>
    ) : null;

  return (
    <form onSubmit={(e) => submit(e, false)} noValidate className="flex flex-col gap-4" aria-describedby="record-status">
      <fieldset className="card">
        <legend className="px-1 text-lg font-semibold">Charge</legend>
        {/* Top-aligned, labels of two lines' height: the value as understood under an input does not shift its neighbour. */}
        <div className="grid grid-cols-2 items-start gap-3">
          <div className="field">
            <label htmlFor="charge-volume" className="flex min-h-12 items-end">
              Volume ({volUnit})
            </label>
            <NumberField
              id="charge-volume"
              className={inputCls('chargeLitres')}
              format={format}
              unit={volUnit}
              value={charge.volume}
              onValueChange={(volume) => {
                setCharge({ ...charge, volume });
                clearError('chargeLitres');
              }}
              aria-invalid={!!err('chargeLitres')}
              aria-describedby={describedBy('chargeLitres')}
            />
            {errorText('chargeLitres')}
          </div>
          <div className="field">
            <label htmlFor="charge-abv" className="flex min-h-12 items-end">
              Strength (% vol at 20 °C)
            </label>
            <NumberField
              id="charge-abv"
              className={inputCls('chargeAbv')}
              format={format}
              grouping={false}
              unit="% vol"
              value={charge.abv}
              onValueChange={(abv) => {
                setCharge({ ...charge, abv });
                clearError('chargeAbv');
              }}
              aria-invalid={!!err('chargeAbv')}
              aria-describedby={describedBy('chargeAbv')}
            />
            {errorText('chargeAbv')}
          </div>
        </div>
        <p className="mt-2 text-sm text-ink-soft">
          LAA charged: <strong data-testid="charged-laa">{charged === null ? '—' : `${f1(charged)} LAA`}</strong>
          {us && charged !== null ? ` (${f2(laaToProofGallons(charged))} proof gal)` : ''}
        </p>
      </fieldset>

      {rows.map((r, i) => {
        const id = (f: string) => `${r.fraction}-${f}`;
        const k = (f: string) => `${r.fraction}.${f}`;
        const x = live[i];
        // Three narrow inputs in a row: what cannot be read is said below the row (with the field's name), not under each input.
        const refusals = (
          [
            ['volume', 'volume', 'Volume'],
            ['reading', 'strength', 'Alcoholmeter'],
            ['temp', 'temp', 'Temperature'],
          ] as const
        ).map(([f, kind, name]) => ({ f, name, id: `${id(f)}-understood`, message: refusalOf(r[f], format, READ_OPTIONS[kind]) }));
        const refusedBy = (f: string) => refusals.find((x) => x.f === f && x.message)?.id;
        const describe = (f: string) => [describedBy(k(f)), refusedBy(f)].filter(Boolean).join(' ') || undefined;
        return (
          <fieldset key={r.fraction} className="card" data-fraction={r.fraction}>
            <legend className="px-1 text-lg font-semibold">{FRACTION_LABELS[r.fraction]}</legend>
            {HINTS[r.fraction] && <p className={`mb-2 text-sm ${r.fraction === 'heads' ? 'caution' : 'text-ink-soft'}`}>{HINTS[r.fraction]}</p>}
            <div className="grid grid-cols-3 items-end gap-2">
              <div className="field">
                <label htmlFor={id('volume')}>Volume ({volUnit})</label>
                <NumberField
                  id={id('volume')}
                  className={inputCls(k('volume'))}
                  format={format}
                  unit={volUnit}
                  value={r.volume}
                  onValueChange={(text) => setRow(i, 'volume', text)}
                  aria-invalid={!!err(k('volume'))}
                  aria-describedby={describe('volume')}
                  echo={false}
                />
              </div>
              <div className="field">
                <label htmlFor={id('reading')}>Alcoholmeter (% vol)</label>
                <NumberField
                  id={id('reading')}
                  className={inputCls(k('reading'))}
                  format={format}
                  grouping={false}
                  unit="% vol"
                  value={r.reading}
                  onValueChange={(text) => setRow(i, 'reading', text)}
                  aria-invalid={!!err(k('reading'))}
                  aria-describedby={describe('reading')}
                  echo={false}
                />
              </div>
              <div className="field">
                <label htmlFor={id('temp')}>at ({tempUnit})</label>
                <NumberField
                  id={id('temp')}
                  className={inputCls(k('temp'))}
                  format={format}
                  grouping={false}
                  negative
                  unit={tempUnit}
                  value={r.temp}
                  onValueChange={(text) => setRow(i, 'temp', text)}
                  aria-invalid={!!err(k('temp'))}
                  aria-describedby={describe('temp')}
                  echo={false}
                />
              </div>
            </div>
            {refusals.map((x) =>
              x.message ? (
                <p key={x.f} id={x.id} className="field-error">
                  {x.name}: {x.message}
                </p>
              ) : null,
            )}
            {errorText(k('volume'))}
            {errorText(k('reading'))}
            {errorText(k('temp'))}
            <div className="field mt-2">
              <label htmlFor={id('note')}>
                Cut note <span className="font-normal text-ink-soft">(your own: where and why you cut)</span>
              </label>
              <input
                id={id('note')}
                className={inputCls(k('cutNote'))}
                maxLength={200}
                value={r.cutNote}
                onChange={(e) => setRow(i, 'cutNote', e.target.value)}
                aria-invalid={!!err(k('cutNote'))}
                aria-describedby={describedBy(k('cutNote'))}
              />
              {errorText(k('cutNote'))}
            </div>
            <p className="mt-2 text-sm" data-testid={`live-${r.fraction}`}>
              {x ? (
                <>
                  True strength <strong>{f1(x.abv20)} % vol</strong> at 20 °C · <strong>{f1(x.laa)} LAA</strong>
                  {us ? ` · ${f2(x.pg)} proof gal` : ''}
                </>
              ) : (
                <span className="text-ink-soft">Strength at 20 °C and LAA appear when volume, reading and temperature are in.</span>
              )}
            </p>
          </fieldset>
        );
      })}

      <section className="card" aria-label="Totals">
        <dl className="grid grid-cols-2 gap-x-4 gap-y-1">
          <dt className="text-ink-soft">LAA collected</dt>
          <dd className="font-semibold" data-testid="collected-laa">
            {f1(collected)} LAA{us ? ` (${f2(laaToProofGallons(collected))} proof gal)` : ''}
          </dd>
          <dt className="text-ink-soft">Recovery of the charge</dt>
          <dd className="font-semibold" data-testid="recovery">
            {charged && charged > 0 ? `${f1((collected / charged) * 100)} %` : '—'}
          </dd>
          <dt className="text-ink-soft">Expected from the ferments</dt>
          <dd className="font-semibold">{p.expectedLaa === null ? '—' : `${f1(p.expectedLaa)} LAA (${f1((collected / p.expectedLaa) * 100)} %)`}</dd>
        </dl>
      </section>

      <p
        id="record-status"
        role="status"
        aria-live="polite"
        className={`min-h-6 font-semibold ${shownMessage.startsWith('Saved') || shownMessage === 'Record saved.' ? 'text-verdigris' : 'text-ember'}`}
      >
        {shownMessage}
      </p>
      <div className="flex flex-wrap gap-3">
        <button type="submit" className="btn btn-quiet" disabled={busy}>
          Save record
        </button>
        {status === 'running' && (
          <button type="button" className="btn" disabled={busy} onClick={(e) => submit(e as unknown as FormEvent, true)}>
            Save and mark run done
          </button>
        )}
      </div>
    </form>
  );
}
