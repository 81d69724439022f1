import { render, screen, within } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { DriftNotice } from '@/features/builds/components/drift-notice';

describe('drift notice on the build page', () => {
  it('names each drifting check with its margin then and now, and the shrink against the threshold', () => {
    render(
      <DriftNotice
        drift={[
          { testCase: 'eq.music.sweep', target: 'evt2-48k', checkId: 'response', unit: 'dB', bestMargin: 1.4, bestSha: '4c1d9e07a2', latestMargin: 0.2, latestSha: 'd19b3f8e44', shrinkDb: 1.2, thresholdDb: 1, builds: 6 },
        ]}
      />,
    );
    const region = screen.getByRole('region', { name: 'Drift' });
    expect(within(region).getByRole('heading').textContent).toContain('Drifting toward a limit (1)');
    const item = region.querySelector('[data-drift-check="response"]')!;
    expect(item.textContent).toContain('eq.music.sweep on evt2-48k');
    expect(item.textContent).toContain('+1.40 dB at 4c1d9e0 → +0.20 dB now');
    expect(item.textContent).toContain('shrank 1.20 dB over 6 builds; threshold 1.00 dB');
  });

  it('shows nothing when no check drifts', () => {
    const { container } = render(<DriftNotice drift={[]} />);
    expect(container.textContent).toBe('');
  });
});
