import { useState } from 'react';
import GravityChart from './GravityChart';
import UploadPanel from './UploadPanel';
import { fermentStats } from './stats';
import { LITRES_PER_US_GALLON, formatTemperature } from '../../lib/units';
import { statusTagClass, fmtSg, fmtDateTime, fmtWindow, fmtRaw } from './format';
import { FORECAST_STATUS_LABELS, READING_METHOD_LABELS, type ForecastStatus, type TemperatureUnit, type UnitSystem } from '../../lib/vocabulary';

export interface ViewReading {
  id: number;
  takenAt: string;
  method: string;
  rawValue: number;
  rawUnit: string;
  sampleTempC: number | null;
  sampleTempUnit: TemperatureUnit | null;
  correctedSg: number;
  lowConfidence: boolean;
  source: string;
  fermentTempC: number | null;
  ph: number | null;
  note: string | null;
  takenByName: string | null;
  edited: boolean;
  /** Held for review (implausible, or a likely duplicate): shown, not counted until accepted. */
  reviewReason?: string | null;
}
export interface ViewForecast {
  status: ForecastStatus;
  reason: string;
  fit: { curve: Array<{ t: string; sg: number }> } | null;
  predictedFg: { value: number; p10: number; p90: number } | null;
  readyAt: string | null;
  readyP10: string | null;
  readyP90: string | null;
  ruleMetAt: string | null;
  stableSince: string | null;
  lastSg: number | null;
  /** Absent in forecasts stored before the wash type's history was used. */
  history?: { count: number; medianDays: number; weight: number } | null;
}
export interface FermentViewProps {
  fermentId: number;
  code: string;
  og: number;
  pitchedAt: string;
  emptied: boolean;
  volumeLitres: number;
  terminalMin: number;
  terminalMax: number;
  stableDays: number;
  units: UnitSystem;
  timeZone: string;
  canWrite: boolean;
  abvFormula: string;
  maxBytes: number;
  maxRows: number;
  highlightId: number | null;
  initial: { readings: ViewReading[]; forecast: ViewForecast | null; now: string };
}

const fmtTemp = (c: number | null, units: UnitSystem) => (c === null ? '–' : formatTemperature(c, units));
const TABLE_ROWS = 60;

export default function FermentView(p: FermentViewProps) {
  const [data, setData] = useState(p.initial);
  const [showAll, setShowAll] = useState(false);
  const [message, setMessage] = useState('');

  async function refresh() {
    const res = await fetch(`/api/ferments/${p.fermentId}`, { headers: { accept: 'application/json' } }).catch(() => null);
    if (!res?.ok) {
      setMessage('Could not refresh; reload the page.');
      return;
    }
    const d = await res.json();
    setData({ readings: d.readings, forecast: d.forecast, now: new Date().toISOString() });
  }

  async function remove(r: ViewReading) {
    if (!window.confirm(`Delete the reading of ${fmtDateTime(r.takenAt, p.timeZone)} (${fmtRaw(r.rawValue, r.rawUnit)})? It stays in the audit log.`)) return;
    const res = await fetch(`/api/readings/${r.id}`, { method: 'DELETE' }).catch(() => null);
    if (res?.status === 204) {
      setMessage('Reading deleted (kept in the audit log).');
      await refresh();
    } else setMessage('Could not delete the reading.');
  }

  async function accept(r: ViewReading) {
    const res = await fetch(`/api/readings/${r.id}/accept`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', accept: 'application/json' },
      body: '{}',
    }).catch(() => null);
    if (res?.ok) {
      setMessage(`Reading of ${fmtDateTime(r.takenAt, p.timeZone)} accepted: it counts in the forecast now.`);
      await refresh();
    } else {
      const data = await res?.json().catch(() => null);
      setMessage(data?.error?.message ?? 'Could not accept the reading.');
    }
  }

  const f = data.forecast;
  // Figures come from the readings that count; a held one is shown but waits to be accepted.
  const counted = data.readings.filter((r) => !r.reviewReason);
  const heldCount = data.readings.length - counted.length;
  const last = counted.length ? counted[counted.length - 1]! : null;
  const stats = fermentStats(p.og, p.volumeLitres, last?.correctedSg ?? null, f?.predictedFg?.value ?? null, { min: p.terminalMin, max: p.terminalMax });
  const status = (f?.status ?? 'insufficient_data') as ForecastStatus;
  const toMs = (s: string | null) => (s ? new Date(s).getTime() : null);
  const laaText = (v: number | null) =>
    v === null ? '–' : p.units === 'us' ? `${v.toFixed(0)} LAA (${(v / (LITRES_PER_US_GALLON / 2)).toFixed(0)} proof gal)` : `${v.toFixed(0)} L`;
  const rows = [...data.readings].reverse();
  const shown = showAll ? rows : rows.slice(0, TABLE_ROWS);

  return (
    <div>
      <section className="card mt-3" aria-labelledby="verdict-heading">
        <h2 id="verdict-heading" className="sr-only">
          Status
        </h2>
        <p className="flex flex-wrap items-center gap-2 text-lg">
          <span className={statusTagClass(status)} data-testid="status-tag">
            {FORECAST_STATUS_LABELS[status]}
          </span>
          <span data-testid="status-reason">{f?.reason ?? 'no forecast yet'}</span>
        </p>
        <p className="mt-1 text-sm text-ink-soft">
          {f?.ruleMetAt ? (
            f.status === 'stalled' ? (
              <>Steady since {fmtDateTime(f.ruleMetAt, p.timeZone)}, but above the wash type’s finishing range: stalled, not ready to distil.</>
            ) : f.status === 'souring' ? (
              <>Steady since {fmtDateTime(f.ruleMetAt, p.timeZone)}, below the finishing range with signs of souring: check the wash before booking it.</>
            ) : (
              <>Stability rule met {fmtDateTime(f.ruleMetAt, p.timeZone)}.</>
            )
          ) : f?.readyP10 ? (
            <>
              Ready (held {p.stableDays} days in range) likely {fmtDateTime(f.readyAt, p.timeZone)}; window {fmtWindow(f.readyP10, f.readyP90, p.timeZone)}{' '}
              (P10–P90).
            </>
          ) : p.emptied ? (
            'Emptied.'
          ) : (
            'No ready window yet.'
          )}
          {!f?.ruleMetAt && f?.readyP10 && f.history && f.history.weight >= 0.01 && (
            <span data-testid="forecast-history">
              {' '}
              Weighed {Math.round(f.history.weight * 100)} % toward {f.history.count} earlier washes of this type, which held steady a median{' '}
              {f.history.medianDays.toFixed(1)} days after pitching.
            </span>
          )}
        </p>
        <dl className="mt-3 grid grid-cols-2 gap-x-4 gap-y-2 sm:grid-cols-4">
          <div>
            <dt className="text-sm text-ink-soft">Current SG</dt>
            <dd className="text-2xl font-bold tabular-nums" data-testid="current-sg">
              {fmtSg(stats.currentSg, 3)}
            </dd>
          </div>
          <div>
            <dt className="text-sm text-ink-soft">Apparent attenuation</dt>
            <dd className="text-2xl font-bold tabular-nums">{stats.attenuation === null ? '–' : `${stats.attenuation.toFixed(0)} %`}</dd>
          </div>
          <div>
            <dt className="text-sm text-ink-soft">ABV so far</dt>
            <dd className="text-2xl font-bold tabular-nums">{stats.abvNow === null ? '–' : `${stats.abvNow.toFixed(1)} %`}</dd>
          </div>
          <div>
            <dt className="text-sm text-ink-soft">ABV at expected FG {stats.expectedFg.toFixed(3)}</dt>
            <dd className="text-2xl font-bold tabular-nums">{stats.abvAtFg === null ? '–' : `${stats.abvAtFg.toFixed(1)} %`}</dd>
          </div>
          <div>
            <dt className="text-sm text-ink-soft">Alcohol in the wash now</dt>
            <dd className="font-semibold tabular-nums">{laaText(stats.laaNow)}</dd>
          </div>
          <div>
            <dt className="text-sm text-ink-soft">At expected FG</dt>
            <dd className="font-semibold tabular-nums">{laaText(stats.laaAtFg)}</dd>
          </div>
          <div className="col-span-2">
            <dt className="text-sm text-ink-soft">Expected FG from</dt>
            <dd className="text-sm">
              {stats.expectedFgSource === 'forecast' && f?.predictedFg
                ? `the fitted curve (${f.predictedFg.p10.toFixed(3)}–${f.predictedFg.p90.toFixed(3)})`
                : 'the middle of the wash type’s range'}
            </dd>
          </div>
        </dl>
        <p className="mt-2 text-xs text-ink-soft">ABV: {p.abvFormula}. Litres of absolute alcohol = volume × ABV / 100.</p>
      </section>

      <section className="card mt-4" aria-labelledby="chart-heading">
        <h2 id="chart-heading">Gravity</h2>
        <GravityChart
          readings={data.readings.map((r) => ({
            t: new Date(r.takenAt).getTime(),
            sg: r.correctedSg,
            lowConfidence: r.lowConfidence,
            held: r.reviewReason ?? null,
          }))}
          curve={(f?.fit?.curve ?? []).map((c) => ({ t: new Date(c.t).getTime(), sg: c.sg }))}
          og={p.og}
          pitchedAt={new Date(p.pitchedAt).getTime()}
          terminalMin={p.terminalMin}
          terminalMax={p.terminalMax}
          stableSince={toMs(f?.stableSince ?? null)}
          readyP10={toMs(f?.readyP10 ?? null)}
          readyP90={toMs(f?.readyP90 ?? null)}
          readyAt={toMs(f?.readyAt ?? null)}
          now={new Date(data.now).getTime()}
          timeZone={p.timeZone}
          label={`Corrected SG of ${p.code} over time: ${data.readings.length} readings, latest ${fmtSg(last?.correctedSg, 3)}; expected finish ${p.terminalMin.toFixed(3)}–${p.terminalMax.toFixed(3)}. The readings are listed in the table below.`}
        />
      </section>

      {p.canWrite && !p.emptied && (
        <UploadPanel
          fermentId={p.fermentId}
          maxBytes={p.maxBytes}
          maxRows={p.maxRows}
          timeZone={p.timeZone}
          onImported={() => {
            void refresh();
          }}
        />
      )}

      <section className="card mt-4 p-0" aria-labelledby="readings-heading" id="readings">
        <div className="flex flex-wrap items-baseline justify-between gap-2 p-4 pb-2">
          <h2 id="readings-heading">Readings ({data.readings.length})</h2>
          <p role="status" aria-live="polite" className="text-sm">
            {message}
          </p>
        </div>
        {heldCount > 0 && (
          <p className="mx-4 mb-2 rounded border-l-4 border-ember bg-ember-soft p-2 text-sm" data-testid="held-summary">
            {heldCount === 1 ? '1 reading is' : `${heldCount} readings are`} held for review: shown below, but left out of the forecast and the stability rule
            until {p.canWrite ? 'you accept' : 'someone accepts'} {heldCount === 1 ? 'it' : 'them'}.
          </p>
        )}
        {data.readings.length === 0 ? (
          <p className="px-4 pb-4">No readings yet.</p>
        ) : (
          <div className="relative overflow-x-auto">
            <table className="data-table" data-testid="readings-table">
              <caption className="sr-only">Readings of {p.code}, newest first</caption>
              <thead>
                <tr>
                  <th scope="col">Time</th>
                  <th scope="col">Corrected SG</th>
                  <th scope="col">As entered</th>
                  <th scope="col">Sample temp</th>
                  <th scope="col">Logged by</th>
                  <th scope="col">Flags</th>
                  {p.canWrite && (
                    <th scope="col">
                      <span className="sr-only">Actions</span>
                    </th>
                  )}
                </tr>
              </thead>
              <tbody>
                {shown.map((r) => (
                  <tr
                    key={r.id}
                    className={r.id === p.highlightId ? 'bg-barley-soft' : r.reviewReason ? 'bg-ember-soft' : ''}
                    data-reading={r.id}
                    data-held={r.reviewReason ? '' : undefined}
                  >
                    <td className="whitespace-nowrap">{fmtDateTime(r.takenAt, p.timeZone)}</td>
                    <td className="font-semibold tabular-nums">
                      {r.correctedSg.toFixed(4)}
                      {r.lowConfidence && <span aria-hidden="true"> △</span>}
                    </td>
                    <td className="whitespace-nowrap">
                      {fmtRaw(r.rawValue, r.rawUnit)} · {(READING_METHOD_LABELS as Record<string, string>)[r.method] ?? r.method}
                    </td>
                    <td className="whitespace-nowrap">
                      {fmtTemp(r.sampleTempC, r.sampleTempUnit === 'F' ? 'us' : r.sampleTempUnit === 'C' ? 'metric' : p.units)}
                    </td>
                    <td>{r.takenByName ?? '–'}</td>
                    <td className="text-sm">
                      {r.reviewReason && (
                        <span className="block font-semibold text-ember" data-testid="held-reason">
                          Held for review: {r.reviewReason}
                        </span>
                      )}
                      {r.lowConfidence && <span className="tag tag-souring mr-1">less certain</span>}
                      {r.source === 'upload' && <span className="tag tag-quiet mr-1">logger</span>}
                      {r.edited && <span className="tag tag-quiet mr-1">edited</span>}
                      {r.ph !== null && <span className="mr-1">pH {r.ph.toFixed(2)}</span>}
                      {r.fermentTempC !== null && <span className="mr-1">wash {fmtTemp(r.fermentTempC, p.units)}</span>}
                      {r.note && <span className="block text-ink-soft">{r.note}</span>}
                    </td>
                    {p.canWrite && (
                      <td className="whitespace-nowrap">
                        {r.reviewReason && (
                          <button type="button" className="mr-3 py-2 font-semibold text-verdigris underline" onClick={() => accept(r)}>
                            Accept<span className="sr-only"> reading of {fmtDateTime(r.takenAt, p.timeZone)}</span>
                          </button>
                        )}
                        <a href={`/ferments/${p.fermentId}/log?reading=${r.id}`} className="mr-3 inline-block py-2">
                          Edit<span className="sr-only"> reading of {fmtDateTime(r.takenAt, p.timeZone)}</span>
                        </a>
                        <button type="button" className="py-2 text-ember underline" onClick={() => remove(r)}>
                          Delete<span className="sr-only"> reading of {fmtDateTime(r.takenAt, p.timeZone)}</span>
                        </button>
                      </td>
                    )}
                  </tr>
                ))}
              </tbody>
            </table>
            {rows.length > TABLE_ROWS && (
              <p className="p-4">
                <button type="button" className="btn btn-quiet" onClick={() => setShowAll(!showAll)}>
                  {showAll ? `Show the latest ${TABLE_ROWS}` : `Show all ${rows.length}`}
                </button>
              </p>
            )}
          </div>
        )}
        <p className="px-4 pb-3 text-xs text-ink-soft">
          △ refractometer readings: corrected for alcohol from the OG (Terrill 2011), less certain than a hydrometer. Hydrometer readings are corrected to the
          calibration temperature (Tanaka et al. 2001 water density).
        </p>
      </section>
    </div>
  );
}
