import type { VerdictDto } from '@earmark/contracts';
import { formatValue } from '../utils/check-format';

function Result({ side }: { side: { pass: boolean; measured: number | null } | null; unit: string | null }) {
  if (!side) return <span className="text-ink-400">not in this mask</span>;
  return <span className={side.pass ? 'text-pass' : 'font-semibold text-fail'}>{side.pass ? 'pass' : 'fail'}</span>;
}

/**
 * What a re-evaluation changed: the engine or mask revision it replaced and, per check, the
 * result and measured value before and after — so a flipped verdict explains itself.
 */
export function ReevaluationChanges({ verdict }: { verdict: VerdictDto }) {
  if (!verdict.previousOutcome || !verdict.changes) return null;
  const engineChanged = verdict.previousEngineVersion !== undefined && verdict.previousEngineVersion !== verdict.engineVersion;
  const maskChanged = verdict.previousMaskRevision !== undefined && verdict.previousMaskRevision !== verdict.maskRevision;
  const why = [
    engineChanged ? `engine ${verdict.previousEngineVersion} → ${verdict.engineVersion}` : null,
    maskChanged ? `mask rev ${verdict.previousMaskRevision ?? 'none'} → ${verdict.maskRevision ?? 'none'}` : null,
  ].filter(Boolean);
  return (
    <section aria-label="What the re-evaluation changed" className="rounded-md border border-line bg-paper-raised px-4 py-3 text-sm">
      <p className="text-ink-800">
        Re-evaluated ({why.length ? why.join(', ') : 'same engine and mask'}): the verdict was{' '}
        <span className="font-semibold text-ink-950">{verdict.previousOutcome}</span> and is{' '}
        <span className="font-semibold text-ink-950">{verdict.outcome}</span>
        {verdict.changes.length === 0 ? '; no check changed.' : '.'}
      </p>
      {verdict.changes.length > 0 ? (
        <div className="mt-2 overflow-x-auto">
          <table aria-label="Checks changed by the re-evaluation" className="w-full min-w-[480px] text-xs">
            <thead>
              <tr className="text-left text-[11px] font-semibold uppercase tracking-[0.06em] text-ink-500">
                <th scope="col" className="py-1 pr-3">Check</th>
                <th scope="col" className="py-1 pr-3">Before</th>
                <th scope="col" className="py-1 pr-3 text-right">Measured before</th>
                <th scope="col" className="py-1 pr-3">After</th>
                <th scope="col" className="py-1 text-right">Measured after</th>
              </tr>
            </thead>
            <tbody>
              {verdict.changes.map((c) => (
                <tr key={c.checkId} data-change-id={c.checkId} className="border-t border-line">
                  <td className="py-1 pr-3 font-mono text-ink-950">{c.checkId}</td>
                  <td className="py-1 pr-3"><Result side={c.before} unit={c.unit} /></td>
                  <td className="py-1 pr-3 text-right font-mono tabular-nums text-ink-700">{c.before ? formatValue(c.before.measured, c.unit) : '—'}</td>
                  <td className="py-1 pr-3"><Result side={c.after} unit={c.unit} /></td>
                  <td className="py-1 text-right font-mono tabular-nums text-ink-900">{c.after ? formatValue(c.after.measured, c.unit) : '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </section>
  );
}
