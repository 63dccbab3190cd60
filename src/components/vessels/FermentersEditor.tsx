import { useState } from 'react';
import { litresToUsGallons } from '../../lib/units';

export interface FermenterItem {
  id: number;
  name: string;
  capacity: string;
  active: boolean;
  holds: string | null;
}

const num = (s: string) => Number(s.trim().replace(',', '.'));

/** Managers add fermenters, rename them, change capacity, retire them. */
export default function FermentersEditor({ initial, volumeUnit }: { initial: FermenterItem[]; volumeUnit: string }) {
  const [items, setItems] = useState(initial);
  const [draft, setDraft] = useState({ name: '', capacity: '' });
  const [errors, setErrors] = useState<Record<string, string>>({});
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
      const fields = data?.error?.fields ?? {};
      setErrors(Object.fromEntries(Object.entries(fields).map(([k, v]) => [`${key}.${k}`, String(v)])));
      setMessage(data?.error?.message ?? 'Not saved.');
      return null;
    }
    setErrors({});
    return data.fermenter as { id: number; name: string; capacityLitres: number; active: boolean; activeFerment: { code: string } | null };
  }
  const display = (litres: number) => (volumeUnit === 'gal' ? String(Number(litresToUsGallons(litres).toFixed(1))) : String(Number(litres.toFixed(1))));

  async function add() {
    const f = await save(null, { name: draft.name, capacity: num(draft.capacity) }, 'new');
    if (f) {
      setItems([...items, { id: f.id, name: f.name, capacity: display(f.capacityLitres), active: f.active, holds: null }]);
      setDraft({ name: '', capacity: '' });
      setMessage(`Added ${f.name}.`);
    }
  }
  async function update(item: FermenterItem, patch: Partial<FermenterItem>) {
    const next = { ...item, ...patch };
    const f = await save(item.id, { name: next.name, capacity: num(next.capacity), active: next.active }, String(item.id));
    if (f) {
      setItems(items.map((i) => (i.id === item.id ? { ...next, capacity: display(f.capacityLitres) } : i)));
      setMessage(`Saved ${f.name}.`);
    }
  }
  const err = (k: string) =>
    errors[k] ? (
      <p className="field-error" id={`fv-${k}-err`}>
        {errors[k]}
      </p>
    ) : null;

  return (
    <div>
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
              <Row key={item.id} item={item} onSave={(patch) => update(item, patch)} err={err} />
            ))}
          </tbody>
        </table>
      </div>
      <div className="mt-3 flex flex-wrap items-end gap-2">
        <div className="field">
          <label htmlFor="fv-new-name">New fermenter</label>
          <input id="fv-new-name" className="input" placeholder="FV9" value={draft.name} onChange={(e) => setDraft({ ...draft, name: e.target.value })} />
          {err('new.name')}
        </div>
        <div className="field">
          <label htmlFor="fv-new-cap">Capacity ({volumeUnit})</label>
          <input
            id="fv-new-cap"
            className="input w-32"
            inputMode="decimal"
            value={draft.capacity}
            onChange={(e) => setDraft({ ...draft, capacity: e.target.value })}
          />
          {err('new.capacity')}
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

function Row({ item, onSave, err }: { item: FermenterItem; onSave: (p: Partial<FermenterItem>) => void; err: (k: string) => React.ReactNode }) {
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
        {err(`${item.id}.name`)}
      </td>
      <td>
        <label className="sr-only" htmlFor={`fv-${item.id}-cap`}>
          Capacity of {item.name}
        </label>
        <input id={`fv-${item.id}-cap`} className="input w-28" inputMode="decimal" value={capacity} onChange={(e) => setCapacity(e.target.value)} />
        {err(`${item.id}.capacity`)}
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
