"use client";
import { Area, CartesianGrid, ComposedChart, Legend, Line, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { formatDb, formatHz, formatHzRange, formatLimitDb } from "@/lib/acoustics/format";

export interface PairChartProps {
  /** The two units' measured responses, in Hz and dB. */
  a: { label: string; points: [number, number][] };
  b: { label: string; points: [number, number][] };
  /** One-third-octave bands over the matched passband: centre and the band of allowed levels. */
  bands: { centreHz: number; nominal: string; low: number; high: number }[];
  limitDb: number;
  minHz: number;
  maxHz: number;
  title: string;
}

const TICKS = [20, 50, 100, 200, 500, 1000, 2000, 5000, 10000, 20000];

/**
 * Two responses overlaid on a log-frequency axis. The shaded band is where both must lie for the
 * pair to be allowed: around the mean of their band levels, ± half the limit, so a band difference
 * of at most the limit keeps both inside it.
 */
export function PairChart({ a, b, bands, limitDb, minHz, maxHz, title }: PairChartProps) {
  const inRange = (p: [number, number]) => p[0] >= minHz / 1.12 && p[0] <= maxHz * 1.12;
  const series = (pts: [number, number][]) => pts.filter(inRange).map(([hz, db]) => ({ hz, db }));
  const band = bands.map((x) => ({ hz: x.centreHz, range: [x.low, x.high] as [number, number] }));
  const all = [...a.points.filter(inRange), ...b.points.filter(inRange)].map((p) => p[1]);
  const lo = Math.floor(Math.min(...all, ...bands.map((x) => x.low)) - 1);
  const hi = Math.ceil(Math.max(...all, ...bands.map((x) => x.high)) + 1);
  return (
    <figure className="rounded-lg border border-line bg-surface p-3" data-testid="pair-chart">
      <figcaption className="mb-1 text-sm font-bold">{title}</figcaption>
      <div className="h-56 w-full" role="img" aria-label={`${title}: responses of ${a.label} and ${b.label}, ${formatHzRange(minHz, maxHz)}, with the ±${formatDb(limitDb / 2)} band around their mean shaded.`}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart margin={{ top: 4, right: 8, bottom: 4, left: 0 }}>
            <CartesianGrid stroke="#d6cfc2" strokeDasharray="2 3" />
            <XAxis dataKey="hz" type="number" scale="log" domain={[minHz, maxHz]} ticks={TICKS.filter((t) => t >= minHz && t <= maxHz)} tickFormatter={(hz: number) => formatHz(hz)} allowDataOverflow fontSize={11} />
            <YAxis type="number" domain={[lo, hi]} allowDataOverflow fontSize={11} width={36} label={{ value: "dB", angle: -90, position: "insideLeft", fontSize: 11 }} />
            <Tooltip formatter={(v) => (Array.isArray(v) ? `${Number(v[0]).toFixed(2)}–${formatDb(Number(v[1]))}` : formatDb(Number(v)))} labelFormatter={(hz) => formatHz(Number(hz))} />
            <Legend verticalAlign="bottom" height={24} iconSize={10} wrapperStyle={{ fontSize: 12 }} />
            <Area data={band} dataKey="range" name={`allowed band (limit ${formatLimitDb(limitDb)})`} type="monotone" stroke="none" fill="#2e6a57" fillOpacity={0.16} isAnimationActive={false} />
            <Line data={series(a.points)} dataKey="db" name={a.label} type="monotone" stroke="#2e6a57" strokeWidth={1.8} dot={false} isAnimationActive={false} />
            <Line data={series(b.points)} dataKey="db" name={b.label} type="monotone" stroke="#7b4f32" strokeWidth={1.8} strokeDasharray="5 3" dot={false} isAnimationActive={false} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}
