"use client";
import { CartesianGrid, ComposedChart, Legend, Line, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { formatDb, formatHz, formatHzRange } from "@/lib/acoustics/format";

export interface ReplaceChartProps {
  survivor: { label: string; points: [number, number][] };
  /** The best candidates, best first (at most three are drawn). */
  candidates: { label: string; points: [number, number][] }[];
  minHz: number;
  maxHz: number;
  title: string;
}

const TICKS = [20, 50, 100, 200, 500, 1000, 2000, 5000, 10000, 20000];
/** The survivor solid and dark; candidates in distinct colours and dashes, so the lines part without colour too. */
const STYLES = [
  { stroke: "#2e6a57", dash: "6 3" },
  { stroke: "#a0522d", dash: "2 3" },
  { stroke: "#3f5f8a", dash: "8 3 2 3" },
];

/** The survivor's response with the best candidates' overlaid, on a log-frequency axis over the matched band. */
export function ReplaceChart({ survivor, candidates, minHz, maxHz, title }: ReplaceChartProps) {
  const inRange = (p: [number, number]) => p[0] >= minHz / 1.12 && p[0] <= maxHz * 1.12;
  const series = (pts: [number, number][]) => pts.filter(inRange).map(([hz, db]) => ({ hz, db }));
  const shown = candidates.slice(0, 3);
  const all = [survivor, ...shown].flatMap((s) => s.points.filter(inRange).map((p) => p[1]));
  const lo = Math.floor(Math.min(...all) - 1);
  const hi = Math.ceil(Math.max(...all) + 1);
  return (
    <figure className="rounded-lg border border-line bg-surface p-3" data-testid="replace-chart">
      <figcaption className="mb-1 text-sm font-bold">{title}</figcaption>
      <div className="h-64 w-full" role="img" aria-label={`${title}: the response of the survivor ${survivor.label} and of ${shown.map((c) => c.label).join(", ") || "no candidate"}, ${formatHzRange(minHz, maxHz)}.`}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart margin={{ top: 4, right: 8, bottom: 4, left: 0 }}>
            <CartesianGrid stroke="#d6cfc2" strokeDasharray="2 3" />
            <XAxis dataKey="hz" type="number" scale="log" domain={[minHz, maxHz]} ticks={TICKS.filter((t) => t >= minHz && t <= maxHz)} tickFormatter={(hz: number) => formatHz(hz)} allowDataOverflow fontSize={11} />
            <YAxis type="number" domain={[lo, hi]} allowDataOverflow fontSize={11} width={36} label={{ value: "dB", angle: -90, position: "insideLeft", fontSize: 11 }} />
            <Tooltip formatter={(v) => formatDb(Number(v))} labelFormatter={(hz) => formatHz(Number(hz))} />
            <Legend verticalAlign="bottom" height={24} iconSize={10} wrapperStyle={{ fontSize: 12 }} />
            <Line data={series(survivor.points)} dataKey="db" name={`${survivor.label} (survivor)`} type="monotone" stroke="#2b2620" strokeWidth={2.2} dot={false} isAnimationActive={false} />
            {shown.map((c, i) => (
              <Line key={c.label} data={series(c.points)} dataKey="db" name={c.label} type="monotone" stroke={STYLES[i]!.stroke} strokeWidth={1.6} strokeDasharray={STYLES[i]!.dash} dot={false} isAnimationActive={false} />
            ))}
          </ComposedChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}
