import { useState, type FormEvent } from 'react';
import NumberField, { readNumber, refuseUnread, typedText, type NumberFormat } from '../forms/NumberField';

export interface FermentFormProps {
  mode: 'create' | 'edit';
  fermentId?: number;
  volumeUnit: string;
  massUnit: string;
  timeZone: string;
  /** How the distillery types numbers; the initial volume, OG and quantities are plain numbers ("1200.5"). */
  numberFormat?: NumberFormat;
  washTypes: Array<{ id: number; name: string; terminalMin: number; terminalMax: number; typicalOg: number | null }>;
  fermenters: Array<{ id: number; name: string; capacity: string; busyWith: string | null; active: boolean }>;
  initial: {
    code: string;
    washTypeId: number | null;
    fermenterId: number | null;
    volume: string;
    pitchedAt: string;
    og: string;
    yeast: string;
    notes: string;
    ingredients: Array<{ name: string; quantity: string }>;
  };
}

export default function FermentForm(props: FermentFormProps) {
  const format = props.numberFormat ?? 'point';
  const inFormat = (plain: string, decimals?: number) => (plain.trim() === '' ? '' : typedText(Number(plain), format, decimals));
  const [v, setV] = useState(() => ({
    ...props.initial,
    volume: inFormat(props.initial.volume),
    og: inFormat(props.initial.og, 3),
    ingredients: props.initial.ingredients.map((i) => ({ ...i, quantity: inFormat(i.quantity) })),
  }));
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState('');
  const [busy, setBusy] = useState(false);
  const set = (k: keyof typeof v, value: unknown) => setV((old) => ({ ...old, [k]: value }));
  const wash = props.washTypes.find((w) => w.id === v.washTypeId);

  async function submit(e: FormEvent) {
    e.preventDefault();
    const local: Record<string, string> = {};
    if (!v.code.trim()) local.code = 'Give the ferment a code.';
    if (!v.washTypeId) local.washTypeId = 'Choose a wash type.';
    const volume = readNumber(v.volume, format);
    if (volume.ok && volume.value === null) local.volume = 'Enter the volume as a number.';
    // A gravity has no thousands: "1.060" typed in comma format is refused, not read as 1060.
    const og = readNumber(v.og, format, { grouping: false });
    if (og.ok && og.value === null) local.og = `Enter the OG as an SG, e.g. ${typedText(1.06, format, 3)}.`;
    const quantities = v.ingredients.map((i) => readNumber(i.quantity, format));
    // A number that cannot be read is refused beside its field (NumberField): focus it, send nothing.
    const unread = refuseUnread([['volume', volume], ['og', og], ...quantities.map((q, i) => [`ing-qty-${i}`, q] as [string, typeof q])]);
    if (unread) {
      setErrors(local);
      setMessage(unread);
      return;
    }
    if (!v.pitchedAt) local.pitchedAt = 'Give the pitch time.';
    setErrors(local);
    if (Object.keys(local).length) {
      setMessage('Check the fields marked below.');
      return;
    }
    setBusy(true);
    setMessage('');
    const body = {
      code: v.code.trim(),
      washTypeId: v.washTypeId,
      fermenterId: v.fermenterId,
      volume: volume.ok ? volume.value : null,
      pitchedAt: v.pitchedAt,
      og: og.ok ? og.value : null,
      yeast: v.yeast.trim() || null,
      notes: v.notes.trim() || null,
      ingredients: v.ingredients.flatMap((i, j) => {
        const q = quantities[j]!;
        return i.name.trim() ? [{ name: i.name.trim(), quantity: q.ok ? (q.value ?? 0) : 0 }] : [];
      }),
    };
    try {
      const res = await fetch(props.mode === 'create' ? '/api/ferments' : `/api/ferments/${props.fermentId}`, {
        method: props.mode === 'create' ? 'POST' : 'PATCH',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify(body),
      });
      const data = await res.json().catch(() => null);
      if (!res.ok) {
        setErrors(data?.error?.fields ?? {});
        setMessage(data?.error?.message ?? 'Could not save the ferment.');
        return;
      }
      window.location.assign(`/ferments/${data.ferment.id}`);
    } catch {
      setMessage('No connection: the ferment was not saved. Try again.');
    } finally {
      setBusy(false);
    }
  }

  const err = (k: string) =>
    errors[k] ? (
      <p id={`${k}-error`} className="field-error">
        {errors[k]}
      </p>
    ) : null;
  const described = (k: string) => (errors[k] ? `${k}-error` : undefined);

  return (
    <form
      onSubmit={submit}
      noValidate
      className="card mt-4 grid max-w-3xl gap-4 sm:grid-cols-2"
      aria-label={props.mode === 'create' ? 'New ferment' : 'Edit ferment'}
    >
      <div className="field">
        <label htmlFor="code">Code</label>
        <input
          id="code"
          className="input"
          value={v.code}
          onChange={(e) => set('code', e.target.value)}
          aria-invalid={!!errors.code}
          aria-describedby={described('code')}
          autoComplete="off"
        />
        {err('code')}
      </div>
      <div className="field">
        <label htmlFor="washTypeId">Wash type</label>
        <select
          id="washTypeId"
          className="input"
          value={v.washTypeId ?? ''}
          onChange={(e) => set('washTypeId', e.target.value ? Number(e.target.value) : null)}
          aria-invalid={!!errors.washTypeId}
          aria-describedby={described('washTypeId')}
        >
          <option value="">Choose…</option>
          {props.washTypes.map((w) => (
            <option key={w.id} value={w.id}>
              {w.name} (ends {w.terminalMin.toFixed(3)}–{w.terminalMax.toFixed(3)})
            </option>
          ))}
        </select>
        {err('washTypeId')}
      </div>
      <div className="field">
        <label htmlFor="fermenterId">Fermenter</label>
        <select
          id="fermenterId"
          className="input"
          value={v.fermenterId ?? ''}
          onChange={(e) => set('fermenterId', e.target.value ? Number(e.target.value) : null)}
          aria-invalid={!!errors.fermenterId}
          aria-describedby={described('fermenterId') ?? 'fermenter-help'}
        >
          <option value="">None / not in a fermenter</option>
          {props.fermenters
            .filter((f) => f.active || f.id === v.fermenterId)
            .map((f) => (
              <option key={f.id} value={f.id} disabled={!!f.busyWith}>
                {f.name} · {f.capacity} · {f.busyWith ? `holds ${f.busyWith}` : 'free'}
              </option>
            ))}
        </select>
        <p id="fermenter-help" className="text-sm text-ink-soft">
          {props.fermenters.filter((f) => f.active && !f.busyWith).length} of {props.fermenters.filter((f) => f.active).length} fermenters free.
        </p>
        {err('fermenterId')}
      </div>
      <div className="field">
        <label htmlFor="volume">Volume ({props.volumeUnit})</label>
        <NumberField
          id="volume"
          format={format}
          unit={props.volumeUnit}
          value={v.volume}
          onValueChange={(text) => set('volume', text)}
          aria-invalid={!!errors.volume}
          aria-describedby={described('volume')}
        />
        {err('volume')}
      </div>
      <div className="field">
        <label htmlFor="pitchedAt">Pitched at ({props.timeZone})</label>
        <input
          id="pitchedAt"
          type="datetime-local"
          className="input"
          value={v.pitchedAt}
          onChange={(e) => set('pitchedAt', e.target.value)}
          aria-invalid={!!errors.pitchedAt}
          aria-describedby={described('pitchedAt')}
        />
        {err('pitchedAt')}
      </div>
      <div className="field">
        <label htmlFor="og">OG (SG)</label>
        <NumberField
          id="og"
          format={format}
          grouping={false}
          unit="SG"
          decimals={3}
          placeholder={wash?.typicalOg ? `typically ${typedText(wash.typicalOg, format, 3)}` : typedText(1.06, format, 3)}
          value={v.og}
          onValueChange={(text) => set('og', text)}
          aria-invalid={!!errors.og}
          aria-describedby={described('og')}
        />
        {err('og')}
      </div>
      <div className="field">
        <label htmlFor="yeast">Yeast</label>
        <input id="yeast" className="input" value={v.yeast} onChange={(e) => set('yeast', e.target.value)} />
      </div>
      <div className="field sm:col-span-2">
        <label htmlFor="notes">Notes</label>
        <textarea id="notes" className="input" rows={3} value={v.notes} onChange={(e) => set('notes', e.target.value)} />
      </div>
      <fieldset className="sm:col-span-2">
        <legend className="label">Recipe (optional, {props.massUnit} of each ingredient)</legend>
        {v.ingredients.map((ing, i) => (
          <div key={i} className="mt-2 flex flex-wrap items-end gap-2">
            <div className="field grow">
              <label htmlFor={`ing-name-${i}`} className="sr-only">
                Ingredient {i + 1}
              </label>
              <input
                id={`ing-name-${i}`}
                className="input"
                placeholder="e.g. Distilling malt"
                value={ing.name}
                onChange={(e) =>
                  set(
                    'ingredients',
                    v.ingredients.map((x, j) => (j === i ? { ...x, name: e.target.value } : x)),
                  )
                }
              />
            </div>
            <div className="field w-28">
              <label htmlFor={`ing-qty-${i}`} className="sr-only">
                Quantity of ingredient {i + 1} in {props.massUnit}
              </label>
              <NumberField
                id={`ing-qty-${i}`}
                format={format}
                unit={props.massUnit}
                placeholder={props.massUnit}
                value={ing.quantity}
                onValueChange={(text) =>
                  set(
                    'ingredients',
                    v.ingredients.map((x, j) => (j === i ? { ...x, quantity: text } : x)),
                  )
                }
                aria-invalid={!!errors[`ingredients.${i}.quantity`]}
                aria-describedby={described(`ingredients.${i}.quantity`)}
              />
              {err(`ingredients.${i}.quantity`)}
            </div>
            <button
              type="button"
              className="btn btn-quiet"
              onClick={() =>
                set(
                  'ingredients',
                  v.ingredients.filter((_, j) => j !== i),
                )
              }
            >
              Remove
            </button>
          </div>
        ))}
        <button type="button" className="btn btn-quiet mt-2" onClick={() => set('ingredients', [...v.ingredients, { name: '', quantity: '' }])}>
          Add ingredient
        </button>
      </fieldset>
      <div className="sm:col-span-2 flex flex-wrap items-center gap-3">
        <button className="btn" type="submit" disabled={busy}>
          {busy ? 'Saving…' : props.mode === 'create' ? 'Start ferment' : 'Save changes'}
        </button>
        <p role="status" aria-live="polite" className={Object.keys(errors).length ? 'field-error' : ''}>
          {message}
        </p>
      </div>
    </form>
  );
}
