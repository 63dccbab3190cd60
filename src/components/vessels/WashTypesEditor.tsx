import { useState } from 'react';
import { WASH_CATEGORIES } from '../../lib/vocabulary';
import FieldError from '../forms/FieldError';
import { useFieldErrors } from '../forms/useFieldErrors';
import NumberField, { readNumber, refuseUnread, typedText, type NumberFormat } from '../forms/NumberField';

export interface WashTypeItem {
  id: number;
  name: string;
  category: string;
  terminalMin: string;
  terminalMax: string;
  typicalOg: string;
}
const SG_FIELDS = ['terminalMin', 'terminalMax', 'typicalOg'] as const;
const blank: WashTypeItem = { id: 0, name: '', category: 'grain', terminalMin: '', terminalMax: '', typicalOg: '' };

/** Managers edit each wash type's expected terminal range (what "finished" means for it) and typical OG. */
export default function WashTypesEditor({
  initial,
  numberFormat = 'point',
}: {
  /** Gravities as plain numbers ("1.002"); written here in the distillery's number format. */
  initial: WashTypeItem[];
  numberFormat?: NumberFormat;
}) {
  const sgText = (v: number | null) => typedText(v, numberFormat, 3);
  const [items, setItems] = useState(() =>
    initial.map((i) => ({
      ...i,
      terminalMin: i.terminalMin && sgText(Number(i.terminalMin)),
      terminalMax: i.terminalMax && sgText(Number(i.terminalMax)),
      typicalOg: i.typicalOg && sgText(Number(i.typicalOg)),
    })),
  );
  const { attach: fieldsRef, ...fe } = useFieldErrors();
  const fieldError = (k: string, inputId: string) => <FieldError {...fe.error(k, inputId)} />;
  const [message, setMessage] = useState('');

  async function save(item: WashTypeItem) {
    setMessage('');
    const key = String(item.id);
    // Gravities never carry thousands: "1.050" in comma format is refused ("did you mean 1,050?"), not read as 1050.
    const read = Object.fromEntries(SG_FIELDS.map((k) => [k, readNumber(item[k], numberFormat, { grouping: false })]));
    const refused = refuseUnread(SG_FIELDS.map((k) => [`wt-${item.id || 'new'}-${k}`, read[k]!]));
    if (refused) {
      setMessage(refused);
      return false;
    }
    const value = (k: (typeof SG_FIELDS)[number]) => (read[k]!.ok ? read[k]!.value : null);
    const body = {
      name: item.name,
      category: item.category,
      terminalMin: value('terminalMin'),
      terminalMax: value('terminalMax'),
      typicalOg: value('typicalOg'),
    };
    const res = await fetch(item.id ? `/api/wash-types/${item.id}` : '/api/wash-types', {
      method: item.id ? 'PATCH' : 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify(body),
    }).catch(() => null);
    const data = await res?.json().catch(() => null);
    if (!res?.ok) {
      // Each message beside its field in this wash type (the first focused); the status line says only the rest.
      setMessage(fe.fromAnswer(data?.error, { scope: key, fallback: 'Not saved.' }));
      return false;
    }
    fe.clear();
    const w = data.washType;
    const saved = {
      id: w.id,
      name: w.name,
      category: w.category,
      terminalMin: sgText(w.terminalMin),
      terminalMax: sgText(w.terminalMax),
      typicalOg: sgText(w.typicalOg),
    };
    setItems(item.id ? items.map((i) => (i.id === item.id ? saved : i)) : [...items, saved]);
    setMessage(`Saved ${w.name}.`);
    return true;
  }

  return (
    <div ref={fieldsRef}>
      <div className="grid gap-3 md:grid-cols-2">
        {items.map((item) => (
          <Editor key={item.id} item={item} fieldError={fieldError} onSave={save} numberFormat={numberFormat} />
        ))}
        <Editor key={`new-${items.length}`} item={blank} fieldError={fieldError} onSave={save} numberFormat={numberFormat} />
      </div>
      <p role="status" aria-live="polite" className="mt-2 text-sm">
        {message}
      </p>
    </div>
  );
}

function Editor({
  item,
  fieldError,
  onSave,
  numberFormat,
}: {
  item: WashTypeItem;
  fieldError: (k: string, inputId: string) => React.ReactNode;
  onSave: (i: WashTypeItem) => Promise<boolean>;
  numberFormat: NumberFormat;
}) {
  const [v, setV] = useState(item);
  const id = item.id || 'new';
  const f = (k: keyof WashTypeItem, label: string, decimal = false) => (
    <div className="field">
      <label htmlFor={`wt-${id}-${k}`}>{label}</label>
      {decimal ? (
        <NumberField
          id={`wt-${id}-${k}`}
          format={numberFormat}
          grouping={false}
          unit="SG"
          decimals={3}
          value={v[k] as string}
          onValueChange={(text) => setV({ ...v, [k]: text })}
        />
      ) : (
        <input id={`wt-${id}-${k}`} className="input" value={v[k] as string} onChange={(e) => setV({ ...v, [k]: e.target.value })} />
      )}
      {fieldError(`${item.id}.${k}`, `wt-${id}-${k}`)}
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
          {fieldError(`${item.id}.category`, `wt-${id}-category`)}
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
