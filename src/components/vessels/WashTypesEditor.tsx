import { useState } from 'react';
import { WASH_CATEGORIES } from '../../lib/vocabulary';

export interface WashTypeItem {
  id: number;
  name: string;
  category: string;
  terminalMin: string;
  terminalMax: string;
  typicalOg: string;
}
const num = (s: string) => Number(s.trim().replace(',', '.'));
const blank: WashTypeItem = { id: 0, name: '', category: 'grain', terminalMin: '', terminalMax: '', typicalOg: '' };

/** Managers edit each wash type's expected terminal range (what "finished" means for it) and typical OG. */
export default function WashTypesEditor({ initial }: { initial: WashTypeItem[] }) {
  const [items, setItems] = useState(initial);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState('');

  async function save(item: WashTypeItem) {
    setMessage('');
    const body = {
      name: item.name,
      category: item.category,
      terminalMin: num(item.terminalMin),
      terminalMax: num(item.terminalMax),
      typicalOg: item.typicalOg.trim() ? num(item.typicalOg) : null,
    };
    const res = await fetch(item.id ? `/api/wash-types/${item.id}` : '/api/wash-types', {
      method: item.id ? 'PATCH' : 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify(body),
    }).catch(() => null);
    const data = await res?.json().catch(() => null);
    const key = String(item.id);
    if (!res?.ok) {
      setErrors(Object.fromEntries(Object.entries(data?.error?.fields ?? {}).map(([k, v]) => [`${key}.${k}`, String(v)])));
      setMessage(data?.error?.message ?? 'Not saved.');
      return false;
    }
    setErrors({});
    const w = data.washType;
    const saved = {
      id: w.id,
      name: w.name,
      category: w.category,
      terminalMin: w.terminalMin.toFixed(3),
      terminalMax: w.terminalMax.toFixed(3),
      typicalOg: w.typicalOg === null ? '' : w.typicalOg.toFixed(3),
    };
    setItems(item.id ? items.map((i) => (i.id === item.id ? saved : i)) : [...items, saved]);
    setMessage(`Saved ${w.name}.`);
    return true;
  }

  return (
    <div>
      <div className="grid gap-3 md:grid-cols-2">
        {items.map((item) => (
          <Editor key={item.id} item={item} errors={errors} onSave={save} />
        ))}
        <Editor key={`new-${items.length}`} item={blank} errors={errors} onSave={save} />
      </div>
      <p role="status" aria-live="polite" className="mt-2 text-sm">
        {message}
      </p>
    </div>
  );
}

function Editor({ item, errors, onSave }: { item: WashTypeItem; errors: Record<string, string>; onSave: (i: WashTypeItem) => Promise<boolean> }) {
  const [v, setV] = useState(item);
  const id = item.id || 'new';
  const f = (k: keyof WashTypeItem, label: string, decimal = false) => (
    <div className="field">
      <label htmlFor={`wt-${id}-${k}`}>{label}</label>
      <input
        id={`wt-${id}-${k}`}
        className="input"
        inputMode={decimal ? 'decimal' : undefined}
        value={v[k] as string}
        onChange={(e) => setV({ ...v, [k]: e.target.value })}
      />
      {errors[`${item.id}.${k}`] && <p className="field-error">{errors[`${item.id}.${k}`]}</p>}
    </div>
  );
  return (
    <form
      className="rounded-lg border border-line p-3"
      onSubmit={async (e) => {
        e.preventDefault();
        if ((await onSave(v)) && !item.id) setV(item);
      }}
      aria-label={item.id ? `Wash type ${item.name}` : 'New wash type'}
    >
      <p className="font-semibold">{item.id ? item.name : 'New wash type'}</p>
      <div className="mt-2 grid grid-cols-2 gap-2">
        {f('name', 'Name')}
        <div className="field">
          <label htmlFor={`wt-${id}-category`}>Category</label>
          <select id={`wt-${id}-category`} className="input" value={v.category} onChange={(e) => setV({ ...v, category: e.target.value })}>
            {WASH_CATEGORIES.map((c) => (
              <option key={c} value={c}>
                {c}
              </option>
            ))}
          </select>
        </div>
        {f('terminalMin', 'Finishes from (SG)', true)}
        {f('terminalMax', 'to (SG)', true)}
        {f('typicalOg', 'Typical OG', true)}
      </div>
      <button type="submit" className="btn btn-quiet mt-2">
        {item.id ? 'Save' : 'Add wash type'}
      </button>
    </form>
  );
}
