import { useState } from 'react';

export interface NotificationPrefsProps {
  kinds: Array<{ kind: string; label: string; hint: string }>;
  initial: Record<string, boolean>;
  workspaceName: string;
}

/** One switch per kind of e-mail; each change is saved at once. */
export default function NotificationPrefs(p: NotificationPrefsProps) {
  const [prefs, setPrefs] = useState(p.initial);
  const [message, setMessage] = useState('');
  const [busy, setBusy] = useState<string | null>(null);

  async function toggle(kind: string, on: boolean) {
    setBusy(kind);
    setMessage('');
    const before = prefs;
    setPrefs({ ...prefs, [kind]: on });
    try {
      const res = await fetch('/api/notifications', {
        method: 'PUT',
        headers: { 'content-type': 'application/json', accept: 'application/json' },
        body: JSON.stringify({ [kind]: on }),
      });
      const data = await res.json().catch(() => null);
      if (!res.ok) throw new Error(data?.error?.message ?? 'not saved');
      setPrefs(data.prefs);
      const label = p.kinds.find((k) => k.kind === kind)?.label ?? kind;
      setMessage(`Saved: ${label} — ${on ? 'on' : 'off'}.`);
    } catch {
      setPrefs(before);
      setMessage('Not saved: check your connection and try again.');
    } finally {
      setBusy(null);
    }
  }

  return (
    <div className="card">
      <fieldset>
        <legend className="mb-3 text-lg font-bold">E-mails from {p.workspaceName}</legend>
        <ul className="flex flex-col gap-4">
          {p.kinds.map((k) => (
            <li key={k.kind} className="flex items-start gap-3">
              <input
                id={`pref-${k.kind}`}
                type="checkbox"
                className="mt-1 h-5 w-5 shrink-0"
                checked={!!prefs[k.kind]}
                disabled={busy === k.kind}
                onChange={(e) => toggle(k.kind, e.target.checked)}
                aria-describedby={`pref-${k.kind}-hint`}
              />
              <div>
                <label htmlFor={`pref-${k.kind}`} className="font-semibold">
                  {k.label}
                </label>
                <p id={`pref-${k.kind}-hint`} className="text-sm text-ink-soft">
                  {k.hint}
                </p>
              </div>
            </li>
          ))}
        </ul>
      </fieldset>
      <p role="status" aria-live="polite" className={message ? 'mt-4 font-semibold' : 'sr-only'}>
        {message}
      </p>
    </div>
  );
}
