import { Bar, CartesianGrid, ComposedChart, Legend, Line, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';

export interface ChartSeries {
  key: string;
  label: string;
  kind: 'bar' | 'line';
  /** Put this series on the right-hand axis. */
  right?: boolean;
}

export interface ReportChartProps {
  /** Accessible name of the chart figure; the table after it holds the same numbers. */
  label: string;
  data: Array<Record<string, string | number | null>>;
  xKey: string;
  series: ChartSeries[];
  leftUnit: string;
  rightUnit?: string;
  height?: number;
  /** Number of decimals in the tooltip. */
  decimals?: number;
}

/** Plateau's chart palette: slate, barley, verdigris, ember, sour, haze (distinct in greyscale print too). */
const PALETTE = ['#35504a', '#c88a12', '#1f7a5c', '#b3261e', '#7a4fa3', '#6b7a76', '#22302d', '#8a5a00'];

/** A bar/line chart for the reports page. Decorative for screen readers: the table next to it carries the figures. */
export default function ReportChart(p: ReportChartProps) {
  const hasRight = p.series.some((s) => s.right);
  const fmt = (v: unknown) => (typeof v === 'number' ? v.toLocaleString('en-GB', { maximumFractionDigits: p.decimals ?? 1 }) : String(v ?? '—'));
  return (
    <figure className="m-0">
      <figcaption className="mb-1 text-sm font-semibold text-ink-soft">{p.label}</figcaption>
      <div aria-hidden="true" style={{ width: '100%', height: p.height ?? 260 }}>
        <ResponsiveContainer width="100%" height="100%" initialDimension={{ width: 700, height: p.height ?? 260 }}>
          <ComposedChart accessibilityLayer={false} data={p.data} margin={{ top: 8, right: hasRight ? 8 : 16, bottom: 4, left: 0 }}>
            <CartesianGrid stroke="#d5d8d2" strokeDasharray="3 3" />
            <XAxis dataKey={p.xKey} tick={{ fill: '#4a5350', fontSize: 12 }} />
            <YAxis
              yAxisId="left"
              tick={{ fill: '#4a5350', fontSize: 12 }}
              width={52}
              label={{ value: p.leftUnit, angle: -90, position: 'insideLeft', fill: '#4a5350', fontSize: 12 }}
            />
            {hasRight && (
              <YAxis
                yAxisId="right"
                orientation="right"
                tick={{ fill: '#4a5350', fontSize: 12 }}
                width={52}
                label={{ value: p.rightUnit ?? '', angle: 90, position: 'insideRight', fill: '#4a5350', fontSize: 12 }}
              />
            )}
            <Tooltip formatter={(v) => fmt(v)} />
            <Legend wrapperStyle={{ fontSize: 13 }} />
            {p.series.map((s, i) =>
              s.kind === 'bar' ? (
                <Bar
                  key={s.key}
                  dataKey={s.key}
                  name={s.label}
                  yAxisId={s.right ? 'right' : 'left'}
                  fill={PALETTE[i % PALETTE.length]}
                  isAnimationActive={false}
                />
              ) : (
                <Line
                  key={s.key}
                  dataKey={s.key}
                  name={s.label}
                  yAxisId={s.right ? 'right' : 'left'}
                  stroke={PALETTE[i % PALETTE.length]}
                  strokeWidth={2.5}
                  dot={{ r: 3 }}
                  connectNulls
                  isAnimationActive={false}
                />
              ),
            )}
          </ComposedChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}
