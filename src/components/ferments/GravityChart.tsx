import { useEffect, useRef, useState } from 'react';
import { ComposedChart, XAxis, YAxis, CartesianGrid, Tooltip, ReferenceArea, ReferenceLine, Line, Scatter, Legend } from 'recharts';

export interface ChartReading {
  t: number;
  sg: number;
  lowConfidence: boolean;
  /** Why the reading is held for review (not counted in the curve or the stability rule); absent when it counts. */
  held?: string | null;
}
export interface ChartProps {
  readings: ChartReading[];
  curve: Array<{ t: number; sg: number }>;
  og: number;
  pitchedAt: number;
  terminalMin: number;
  terminalMax: number;
  stableSince: number | null;
  readyP10: number | null;
  readyP90: number | null;
  readyAt: number | null;
  now: number;
  timeZone: string;
  label: string;
}

const DAY = 86_400_000;

function dayTick(t: number, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone, day: 'numeric', month: 'short' }).format(new Date(t));
}

/** Corrected SG over time, with the wash type's terminal band, the flat stretch, the fitted curve and the ready window. */
export default function GravityChart(p: ChartProps) {
  const box = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState(0);
  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const measure = () => setWidth(Math.floor(el.getBoundingClientRect().width));
    measure();
    const ro = new ResizeObserver(measure);
    ro.observe(el);
    return () => ro.disconnect();
  }, []);

  const counted = p.readings.filter((r) => !r.held);
  const hydro = counted.filter((r) => !r.lowConfidence);
  const refr = counted.filter((r) => r.lowConfidence);
  const held = p.readings.filter((r) => r.held);
  const lastT = p.readings.length ? Math.max(...p.readings.map((r) => r.t)) : p.pitchedAt;
  const xMax = Math.max(lastT, p.now, p.readyP90 ?? 0, p.curve.length ? p.curve[p.curve.length - 1]!.t : 0) + DAY / 4;
  const xMin = p.pitchedAt - DAY / 8;
  const curve = p.curve.filter((c) => c.t <= xMax);
  const sgs = [...p.readings.map((r) => r.sg), ...curve.map((c) => c.sg), p.og, p.terminalMin, p.terminalMax];
  const yMin = Math.floor((Math.min(...sgs) - 0.002) * 1000) / 1000;
  const yMax = Math.ceil((Math.max(...sgs) + 0.002) * 1000) / 1000;
  const ticks: number[] = [];
  const step = Math.max(1, Math.ceil((xMax - xMin) / DAY / (width < 500 ? 5 : 10)));
  const firstMidnight = Math.ceil(xMin / DAY) * DAY;
  for (let t = firstMidnight; t <= xMax; t += step * DAY) ticks.push(t);
  const height = width < 500 ? 300 : 380;

  return (
    <figure className="m-0">
      <div ref={box} style={{ width: '100%', minHeight: height }} role="img" aria-label={p.label} data-testid="gravity-chart">
        {width > 0 && (
          <ComposedChart width={width} height={height} margin={{ top: 18, right: 12, bottom: 4, left: 4 }}>
            <CartesianGrid stroke="#e3e5e0" />
            <XAxis
              dataKey="t"
              type="number"
              domain={[xMin, xMax]}
              ticks={ticks}
              tickFormatter={(t: number) => dayTick(t, p.timeZone)}
              allowDataOverflow
              stroke="#4a5350"
              fontSize={12}
            />
            <YAxis
              type="number"
              domain={[yMin, yMax]}
              tickFormatter={(v: number) => v.toFixed(3)}
              width={52}
              allowDataOverflow
              stroke="#4a5350"
              fontSize={12}
            />
            <ReferenceArea
              y1={p.terminalMin}
              y2={p.terminalMax}
              fill="#1f7a5c"
              fillOpacity={0.14}
              stroke="none"
              ifOverflow="hidden"
              label={{ value: 'expected finish', position: 'insideBottomLeft', fill: '#1f7a5c', fontSize: 11 }}
            />
            {p.readyP10 !== null && p.readyP90 !== null && (
              <ReferenceArea
                x1={p.readyP10}
                x2={Math.max(p.readyP90, p.readyP10 + DAY / 24)}
                fill="#c88a12"
                fillOpacity={0.16}
                stroke="#c88a12"
                strokeOpacity={0.5}
                ifOverflow="hidden"
                label={{ value: 'ready window', position: 'insideTop', fill: '#8a5a00', fontSize: 11 }}
              />
            )}
            {p.stableSince !== null && lastT > p.stableSince && (
              <ReferenceArea
                x1={p.stableSince}
                x2={lastT}
                fill="#35504a"
                fillOpacity={0.12}
                stroke="#35504a"
                strokeDasharray="4 3"
                ifOverflow="hidden"
                label={{ value: 'flat', position: 'insideTopLeft', fill: '#22302d', fontSize: 11 }}
              />
            )}
            <ReferenceLine x={p.now} stroke="#6b7a76" strokeDasharray="2 3" label={{ value: 'now', position: 'top', fill: '#4a5350', fontSize: 11 }} />
            {curve.length > 1 && (
              <Line
                data={curve}
                dataKey="sg"
                name="Fitted curve"
                type="monotone"
                dot={false}
                stroke="#c88a12"
                strokeWidth={2}
                strokeDasharray="6 4"
                isAnimationActive={false}
              />
            )}
            <Scatter data={hydro} dataKey="sg" name="Hydrometer / digital" fill="#22302d" isAnimationActive={false} />
            {refr.length > 0 && (
              <Scatter
                data={refr}
                dataKey="sg"
                name="Refractometer (less certain)"
                shape="triangle"
                fill="#ffffff"
                stroke="#7a4fa3"
                strokeWidth={1.5}
                isAnimationActive={false}
              />
            )}
            {held.length > 0 && (
              <Scatter
                data={held}
                dataKey="sg"
                name="Held for review (not counted)"
                shape="cross"
                fill="#b3261e"
                stroke="#b3261e"
                strokeWidth={1.5}
                isAnimationActive={false}
              />
            )}
            <Tooltip
              formatter={(v: unknown, name: unknown, item: { payload?: ChartReading } | undefined) => {
                const text = typeof v === 'number' ? v.toFixed(4) : String(v);
                return item?.payload?.held ? [`${text} (held: ${item.payload.held})`, String(name)] : text;
              }}
              labelFormatter={(t: unknown) =>
                typeof t === 'number'
                  ? new Intl.DateTimeFormat('en-GB', { timeZone: p.timeZone, dateStyle: 'medium', timeStyle: 'short' }).format(new Date(t))
                  : ''
              }
            />
            <Legend
              verticalAlign="bottom"
              wrapperStyle={{ fontSize: 12 }}
              formatter={(value: unknown) => <span style={{ color: '#1d2321' }}>{String(value)}</span>}
            />
          </ComposedChart>
        )}
      </div>
      <figcaption className="mt-1 text-xs text-ink-soft">
        Green band: this wash type's expected finishing gravity ({p.terminalMin.toFixed(3)}–{p.terminalMax.toFixed(3)}). Dashed gold line: fitted curve; gold
        area: ready window (P10–P90). Grey area: the current flat stretch. Triangles: refractometer readings (less certain).
        {held.length > 0 && ` Red crosses: ${held.length} reading${held.length === 1 ? '' : 's'} held for review, left out of the curve until accepted.`}
      </figcaption>
    </figure>
  );
}
