import { useState, type FormEvent } from 'react';
import type { FeedScope } from '../../lib/vocabulary';

export interface FeedRowJson {
  id: number;
  name: string;
  scope: FeedScope;
  stillId: number | null;
  stillName: string | null;
  personId: number | null;
  personName: string | null;
  createdAt: string;
  createdById: number | null;
  createdByName: string | null;
  /** The creator's current role here; null once they have left. */
  createdByRole: string | null;
  lastFetchedAt: string | null;
  /** False once the address no longer opens (holder left, disabled, or their role no longer allows it). */
  live: boolean;
  stoppedBecause: string | null;
}

export interface FeedsManagerProps {
  initial: FeedRowJson[];
  stills: Array<{ id: number; name: string }>;
  timeZone: string;
  userId: number;
  /** A manager sees and revokes everyone's feeds. */
  manager: boolean;
  workspaceName: string;
}

interface Created {
  feed: FeedRowJson;
  url: string;
  webcal: string;
}

const SCOPE_WORDS: Record<FeedRowJson['scope'], string> = { workspace: 'Whole distillery', still: 'One still', person: 'Runs operated by' };

function scopeText(f: FeedRowJson): string {
  if (f.scope === 'workspace') return SCOPE_WORDS.workspace;
  if (f.scope === 'still') return `Still: ${f.stillName ?? 'removed still'}`;
  return `Runs of ${f.personName ?? 'a former member'}`;
}

interface HolderGroup {
  key: string;
  holderId: number | null;
  name: string;
  role: string | null;
  feeds: FeedRowJson[];
}

/** The manager's list: one group per person holding feeds; people still here first, by name. */
function groupByHolder(feeds: FeedRowJson[]): HolderGroup[] {
  const groups = new Map<string, HolderGroup>();
  for (const f of feeds) {
    const key = f.createdById === null ? 'none' : String(f.createdById);
    if (!groups.has(key)) groups.set(key, { key, holderId: f.createdById, name: f.createdByName ?? 'Deleted account', role: f.createdByRole, feeds: [] });
    groups.get(key)!.feeds.push(f);
  }
  const rank = (g: HolderGroup) => (g.holderId === null ? 2 : g.role === null ? 1 : 0);
  return [...groups.values()].sort((a, b) => rank(a) - rank(b) || a.name.localeCompare(b.name, 'en'));
}

/** Create, list and revoke calendar feeds. The subscription address is shown once, right after creation. */
export default function FeedsManager(p: FeedsManagerProps) {
  const [feeds, setFeeds] = useState(p.initial);
  const [scope, setScope] = useState<FeedRowJson['scope']>('workspace');
  const [stillId, setStillId] = useState<number | ''>(p.stills[0]?.id ?? '');
  const [name, setName] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState('');
  const [busy, setBusy] = useState(false);
  const [created, setCreated] = useState<Created | null>(null);
  const [copied, setCopied] = useState(false);
  const when = (iso: string | null) =>
    iso ? new Date(iso).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone: p.timeZone }) : 'Never';

  async function create(e: FormEvent) {
    e.preventDefault();
    setBusy(true);
    setErrors({});
    setMessage('');
    setCopied(false);
    const body: Record<string, unknown> = { scope };
    if (scope === 'still') body.stillId = stillId === '' ? undefined : stillId;
    if (name.trim()) body.name = name.trim();
    try {
      const res = await fetch('/api/feeds', {
        method: 'POST',
        headers: { 'content-type': 'application/json', accept: 'application/json' },
        body: JSON.stringify(body),
      });
      const data = await res.json().catch(() => null);
      if (!res.ok) {
        setErrors(data?.error?.fields ?? {});
        setMessage(data?.error?.message ?? 'The feed was not created.');
        return;
      }
      setCreated({ feed: data.feed, url: data.url, webcal: data.webcal });
      setFeeds((old) => [data.feed, ...old]);
      setName('');
    } catch {
      setMessage('No connection: the feed was not created. Try again.');
    } finally {
      setBusy(false);
    }
  }

  async function copy() {
    if (!created) return;
    try {
      await navigator.clipboard.writeText(created.url);
      setCopied(true);
    } catch {
      // Clipboard refused (no permission): select the text so it can be copied by hand.
      const input = document.getElementById('feed-url') as HTMLInputElement | null;
      input?.select();
      setMessage('Copy the address by hand: it is selected.');
    }
  }

  async function revoke(f: FeedRowJson) {
    if (!window.confirm(`Revoke "${f.name}"? Calendars subscribed to it stop updating.`)) return;
    const res = await fetch(`/api/feeds/${f.id}`, { method: 'DELETE', headers: { accept: 'application/json' } }).catch(() => null);
    if (res?.status === 204) {
      setFeeds((old) => old.filter((x) => x.id !== f.id));
      if (created?.feed.id === f.id) setCreated(null);
      setMessage(`"${f.name}" revoked.`);
    } else setMessage('Could not revoke the feed. Reload the page and try again.');
  }

  const row = (f: FeedRowJson) => (
    <tr key={f.id} data-feed-id={f.id}>
      <td className="font-semibold">{f.name}</td>
      <td>{scopeText(f)}</td>
      <td>
        {when(f.createdAt)}
        <span className="block text-sm text-ink-soft">by {f.createdById === p.userId ? 'you' : (f.createdByName ?? 'a deleted account')}</span>
      </td>
      <td>{when(f.lastFetchedAt)}</td>
      <td>
        {f.live ? (
          'Working'
        ) : (
          <span className="font-semibold text-ember">
            Stopped<span className="block text-sm font-normal text-ink">{f.stoppedBecause}</span>
          </span>
        )}
      </td>
      <td>
        <button
          type="button"
          className="btn btn-quiet"
          onClick={() => revoke(f)}
          aria-label={`Revoke ${f.name}${p.manager && f.createdByName ? ` (${f.createdByName})` : ''}`}
        >
          Revoke
        </button>
      </td>
    </tr>
  );

  return (
    <div className="flex flex-col gap-6">
      <section className="card" aria-labelledby="new-feed-h">
        <h2 id="new-feed-h" className="mb-3 text-lg font-bold">
          New feed
        </h2>
        <form onSubmit={create} className="flex flex-col gap-4 sm:max-w-xl" noValidate>
          <fieldset>
            <legend className="label">Which runs</legend>
            <div className="mt-1 flex flex-col gap-2">
              <label className="flex items-center gap-2">
                <input type="radio" name="scope" value="workspace" checked={scope === 'workspace'} onChange={() => setScope('workspace')} /> Every still at{' '}
                {p.workspaceName}
              </label>
              <label className="flex items-center gap-2">
                <input
                  type="radio"
                  name="scope"
                  value="still"
                  checked={scope === 'still'}
                  onChange={() => setScope('still')}
                  disabled={p.stills.length === 0}
                />{' '}
                One still
              </label>
              <label className="flex items-center gap-2">
                <input type="radio" name="scope" value="person" checked={scope === 'person'} onChange={() => setScope('person')} /> The runs I operate
              </label>
            </div>
          </fieldset>
          {scope === 'still' && (
            <div className="field">
              <label htmlFor="feed-still">Still</label>
              <select
                id="feed-still"
                className="input"
                value={stillId}
                onChange={(e) => setStillId(Number(e.target.value))}
                aria-invalid={errors.stillId ? true : undefined}
              >
                {p.stills.map((s) => (
                  <option key={s.id} value={s.id}>
                    {s.name}
                  </option>
                ))}
              </select>
              {errors.stillId && <p className="field-error">{errors.stillId}</p>}
            </div>
          )}
          <div className="field">
            <label htmlFor="feed-name">Name (optional)</label>
            <input
              id="feed-name"
              className="input"
              value={name}
              maxLength={120}
              onChange={(e) => setName(e.target.value)}
              placeholder="e.g. Kitchen wall tablet"
            />
            {errors.name && <p className="field-error">{errors.name}</p>}
          </div>
          <div>
            <button className="btn" type="submit" disabled={busy}>
              {busy ? 'Creating…' : 'Create feed'}
            </button>
          </div>
        </form>
      </section>

      {created && (
        <section className="card border-verdigris" aria-labelledby="created-h" data-testid="feed-created">
          <h2 id="created-h" className="mb-2 text-lg font-bold">
            Subscribe to “{created.feed.name}”
          </h2>
          <p className="caution mb-3">
            This address is shown only now. Anyone who has it can read these runs (nothing else, and they cannot change anything). Keep it to your own calendar;
            if it leaks, revoke the feed and make a new one.
          </p>
          <div className="field">
            <label htmlFor="feed-url">Subscription address</label>
            <div className="flex flex-col gap-2 sm:flex-row">
              <input
                id="feed-url"
                className="input grow font-mono text-sm"
                readOnly
                value={created.url}
                onFocus={(e) => e.currentTarget.select()}
                data-testid="feed-url"
              />
              <button className="btn" type="button" onClick={copy}>
                {copied ? 'Copied' : 'Copy address'}
              </button>
            </div>
          </div>
          <p className="mt-3">
            <a href={created.webcal} className="font-semibold">
              Open in my calendar app
            </a>{' '}
            <span className="text-sm text-ink-soft">(webcal link; or paste the address into “subscribe to calendar”)</span>
          </p>
          <p className="mt-2 text-sm text-ink-soft">
            Runs appear as “tentative” until every wash they take is confirmed stable, then turn “confirmed” by themselves. Calendar apps refresh about once an
            hour.
          </p>
        </section>
      )}

      <p role="status" aria-live="polite" className={message ? 'font-semibold' : 'sr-only'}>
        {message}
      </p>

      <section aria-labelledby="feeds-h">
        <h2 id="feeds-h" className="mb-2 text-lg font-bold">
          {p.manager ? 'Feeds at this distillery' : 'Your feeds'}
        </h2>
        {p.manager && (
          <p className="mb-2 max-w-prose text-sm text-ink-soft">
            Grouped by the person who holds each feed. A feed stops working by itself when its holder leaves the distillery or their role no longer allows it;
            revoke it to remove it from this list.
          </p>
        )}
        {feeds.length === 0 ? (
          <p className="card text-ink-soft">No feeds yet.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="data-table w-full" data-testid="feeds-table">
              <thead>
                <tr>
                  <th scope="col">Name</th>
                  <th scope="col">Runs</th>
                  <th scope="col">Created</th>
                  <th scope="col">Last fetched</th>
                  <th scope="col">Status</th>
                  <th scope="col">
                    <span className="sr-only">Actions</span>
                  </th>
                </tr>
              </thead>
              {p.manager ? (
                groupByHolder(feeds).map((g) => (
                  <tbody key={g.key} data-testid="feed-holder">
                    <tr>
                      <th scope="rowgroup" colSpan={6} className="bg-ground text-left">
                        {g.holderId === p.userId ? `${g.name} (you)` : g.name}
                        <span className="ml-2 text-sm font-normal text-ink-soft">
                          {g.holderId === null ? 'account deleted' : g.role === null ? 'no longer a member' : g.role}
                        </span>
                        <span className="ml-2 text-sm font-normal text-ink-soft">
                          · {g.feeds.length} {g.feeds.length === 1 ? 'feed' : 'feeds'}
                        </span>
                      </th>
                    </tr>
                    {g.feeds.map(row)}
                  </tbody>
                ))
              ) : (
                <tbody>{feeds.map(row)}</tbody>
              )}
            </table>
          </div>
        )}
      </section>
    </div>
  );
}
