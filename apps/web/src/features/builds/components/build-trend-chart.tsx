import type { BuildTrend } from '@earmark/contracts';
import { cn } from '@/lib/cn';
import { formatDateTime } from '@/lib/format-time';
import { shortSha } from '@/lib/sha';

const WIDTH = 960;
const HEIGHT = 64;
const PAD = 6;

type Point = BuildTrend['points'][number];

function rate(point: Point): number | null {
  return point.total > 0 ? point.passed / point.total : null;
}

/**
 * Pass rate (captures passed ÷ captures) of the last builds, oldest left. A small hand-drawn
 * SVG rather than a plotting library: fifty points need no zoom or cursor. A failing build's
 * point is the square of a failed verdict, an errored one the diamond; hovering a point names it.
 */
export function BuildTrendChart({ trend, className }: { trend: BuildTrend; className?: string }) {
  const points = trend.points;
  // A build still being analysed has a partial rate; the headline number waits for a finished one.
  const latest = [...points].reverse().find((point) => rate(point) !== null && point.status !== 'pending' && point.status !== 'running');
  const latestRate = latest ? rate(latest) : null;
  const step = points.length > 1 ? (WIDTH - 2 * PAD) / (points.length - 1) : 0;
  const placed = points.map((point, index) => {
    const value = rate(point);
    return {
      point,
      value,
      x: points.length > 1 ? PAD + index * step : WIDTH / 2,
      y: value === null ? null : PAD + (1 - value) * (HEIGHT - 2 * PAD),
    };
  });
  const line = placed
    .flatMap((p) => (p.y === null ? [] : [`${p.x.toFixed(1)} ${p.y.toFixed(1)}`]))
    .map((xy, index) => `${index === 0 ? 'M' : 'L'}${xy}`)
    .join(' ');
  const summary =
    latestRate === null
      ? 'Pass-rate trend: no judged builds yet.'
      : `Pass-rate trend of the last ${points.length} builds; the newest finished build passed ${Math.round(latestRate * 100)}% of its captures.`;

  return (
    <figure className={cn('hidden items-center gap-5 sm:flex rounded-lg border border-line bg-paper-raised px-4 py-3', className)}>
      <figcaption className="w-32 shrink-0">
        <span className="block text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">Pass rate</span>
        <span className="mt-0.5 block font-mono text-xl font-medium tabular-nums text-ink-950">
          {latestRate === null ? '—' : `${Math.round(latestRate * 100)}%`}
        </span>
        <span className="block text-xs text-ink-500">
          newest finished build
        </span>
      </figcaption>
      <svg viewBox={`0 0 ${WIDTH} ${HEIGHT}`} role="img" aria-label={summary} className="h-16 w-full min-w-0 flex-1" preserveAspectRatio="xMinYMid meet">
        <line x1={0} x2={WIDTH} y1={PAD} y2={PAD} stroke="var(--color-line-strong)" strokeDasharray="2 4" />
        <line x1={0} x2={WIDTH} y1={HEIGHT - PAD} y2={HEIGHT - PAD} stroke="var(--color-line)" />
        <text x={WIDTH} y={PAD + 9} textAnchor="end" fontSize="8" fill="var(--color-ink-400)" fontFamily="var(--font-mono)">
          100%
        </text>
        {line ? <path d={line} fill="none" stroke="var(--color-ink-600)" strokeWidth="1.25" strokeLinejoin="round" /> : null}
        {placed.map(({ point, value, x, y }) => {
          if (y === null) return null;
          const label = `${shortSha(point.sha)} · ${formatDateTime(point.createdAt)} · ${point.passed} of ${point.total} passed${value === null ? '' : ` (${Math.round(value * 100)}%)`}`;
          if (point.status === 'fail') {
            return (
              <rect key={point.sha} x={x - 3.2} y={y - 3.2} width={6.4} height={6.4} rx={0.8} fill="var(--color-fail)">
                <title>{label}</title>
              </rect>
            );
          }
          if (point.status === 'error') {
            return (
              <path key={point.sha} d={`M${x} ${y - 4}L${x + 4} ${y}L${x} ${y + 4}L${x - 4} ${y}Z`} fill="var(--color-error)">
                <title>{label}</title>
              </path>
            );
          }
          return (
            <circle
              key={point.sha}
              cx={x}
              cy={y}
              r={3}
              fill={point.status === 'pass' ? 'var(--color-pass)' : 'var(--color-paper-raised)'}
              stroke={point.status === 'pass' ? 'none' : 'var(--color-ink-500)'}
              strokeWidth={1}
            >
              <title>{label}</title>
            </circle>
          );
        })}
      </svg>
    </figure>
  );
}
