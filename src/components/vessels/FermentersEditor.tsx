import { useState } from 'react';
import { litresToUsGallons } from '../../lib/units';
import FieldError from '../forms/FieldError';
import { useFieldErrors } from '../forms/useFieldErrors';
import NumberField, { readNumber, refuseUnread, typedText, type NumberFormat } from '../forms/NumberField';

export interface FermenterItem {
  id: number;
  name: string;
  capacity: string;
  active: boolean;
  holds: string | null;
}

/** Managers add fermenters, rename them, change capacity, retire them. Capacities are typed in the distillery's number format. */
export default function FermentersEditor({
  initial,
  volumeUnit,
  numberFormat = 'point',
}: {
  /** Capacities as plain numbers ("1200.5"); written here in the distillery's number format. */
  initial: FermenterItem[];
  volumeUnit: string;
  numberFormat?: NumberFormat;
}) {
  const [items, setItems] = useState(() => initial.map((i) => ({ ...i, capacity: typedText(Number(i.capacity), numberFormat) })));
  const [draft, setDraft] = useState({ name: '', capacity: '' });
  const { attach: fieldsRef, ...fe } = useFieldErrors();
  const [message, setMessage] = useState('');

  async function save(id: number | null, body: Record<string, unknown>, key: string) {
    setMessage('');
    const res = await fetch(id ? `/api/fermenters/${id}` : '/api/fermenters', {
      method: id ? 'PATCH' : 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify(body),
    }).catch(() => null);
    const data = await res?.json().catch(() => null);
    if (!res?.ok) {
      // Each message beside its field in this row (the first focused); the status line says only the rest.
      setMessage(fe.fromAnswer(data?.error, { scope: key, fallback: 'Not saved.' }));
      return null;
    }
    fe.clear();
    return data.fermenter as { id: number; name: string; capacityLitres: number; active: boolean; activeFerment: { code: string } | null };
  }
  const display = (litres: number) => typedText(Number((volumeUnit === 'gal' ? litresToUsGallons(litres) : litres).toFixed(1)), numberFormat);
  /** The capacity as the distillery's format reads it; when it cannot be read (the refusal is beside the field) nothing is sent. */
  function capacityOf(text: string, inputId: string): number | null | undefined {
    const r = readNumber(text, numberFormat);
    const refused = refuseUnread([[inputId, r]]);
    if (refused) setMessage(refused);
    return r.ok ? r.value : undefined;
  }

  async function add() {
    const capacity = capacityOf(draft.capacity, 'fv-new-cap');
    if (capacity === undefined) return;
    const f = await save(null, { name: draft.name, capacity }, 'new');
    if (f) {
      setItems([...items, { id: f.id, name: f.name, capacity: display(f.capacityLitres), active: f.active, holds: null }]);
      setDraft({ name: '', capacity: '' });
      setMessage(`Added ${f.name}.`);
    }
  }
  async function update(item: FermenterItem, patch: Partial<FermenterItem>) {
    const next = { ...item, ...patch };
    const capacity = capacityOf(next.capacity, `fv-${item.id}-cap`);
    if (capacity === undefined) return;
    const f = await save(item.id, { name: next.name, capacity, active: next.active }, String(item.id));
    if (f) {
      setItems(items.map((i) => (i.id === item.id ? { ...next, capacity: display(f.capacityLitres) } : i)));
      setMessage(`Saved ${f.name}.`);
    }
  }
  const err = (k: string, inputId: string) => <FieldError {...fe.error(k, inputId)} />;

  return (
    <div ref={fieldsRef}>
      <div className="relative overflow-x-auto">
        <table className="data-table">
          <caption className="sr-only">Fermenters</caption>
          <thead>
            <tr>
              <th scope="col">Name</th>
              <th scope="col">Capacity ({volumeUnit})</th>
              <th scope="col">Now holds</th>
              <th scope="col">In use</th>
              <th scope="col">
                <span className="sr-only">Save</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {items.map((item) => (
              <Row key={item.id} item={item} onSave={(patch) => update(item, patch)} err={err} numberFormat={numberFormat} unit={volumeUnit} />
            ))}
          </tbody>
        </table>
      </div>
      <div className="mt-3 flex flex-wrap items-end gap-2">
        <div className="field">
          <label htmlFor="fv-new-name">New fermenter</label>
          <input id="fv-new-name" className="input" placeholder="FV9" value={draft.name} onChange={(e) => setDraft({ ...draft, name: e.target.value })} />
          {err('new.name', 'fv-new-name')}
        </div>
        <div className="field">
          <label htmlFor="fv-new-cap">Capacity ({volumeUnit})</label>
          <NumberField
            id="fv-new-cap"
            className="input w-32"
            format={numberFormat}
            unit={volumeUnit}
            value={draft.capacity}
            onValueChange={(capacity) => setDraft({ ...draft, capacity })}
          />
          {err('new.capacity', 'fv-new-cap')}
        </div>
        <button type="button" className="btn" onClick={add}>
          Add fermenter
        </button>
      </div>
      <p role="status" aria-live="polite" className="mt-2 text-sm">
        {message}
      </p>
    </div>
  );
}

function Row({
  item,
  onSave,
  err,
  numberFormat,
  unit,
}: {
  item: FermenterItem;
  onSave: (p: Partial<FermenterItem>) => void;
  err: (k: string, inputId: string) => React.ReactNode;
  numberFormat: NumberFormat;
  unit: string;
}) {
  const [name, setName] = useState(item.name);
  const [capacity, setCapacity] = useState(item.capacity);
  const [active, setActive] = useState(item.active);
  return (
    <tr>
      <td>
        <label className="sr-only" htmlFor={`fv-${item.id}-name`}>
          Name of {item.name}
        </label>
        <input id={`fv-${item.id}-name`} className="input w-28" value={name} onChange={(e) => setName(e.target.value)} />
        {err(`${item.id}.name`, `fv-${item.id}-name`)}
      </td>
      <td>
        <label className="sr-only" htmlFor={`fv-${item.id}-cap`}>
          Capacity of {item.name}
        </label>
        <NumberField id={`fv-${item.id}-cap`} className="input w-28" format={numberFormat} unit={unit} value={capacity} onValueChange={setCapacity} />
        {err(`${item.id}.capacity`, `fv-${item.id}-cap`)}
      </td>
      <td>{item.holds ?? 'free'}</td>
      <td>
        <label className="flex min-h-11 items-center gap-2">
          <input type="checkbox" checked={active} onChange={(e) => setActive(e.target.checked)} />{' '}
          <span>
            in use<span className="sr-only"> ({item.name})</span>
          </span>
        </label>
      </td>
      <td>
        <button type="button" className="btn btn-quiet" onClick={() => onSave({ name, capacity, active })}>
          Save<span className="sr-only"> {item.name}</span>
        </button>
      </td>
    </tr>
  );
}
