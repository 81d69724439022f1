import type { EntityManager } from '@mikro-orm/postgresql';
import type { DriftFlag, DriftQuery, DriftResponse } from '@earmark/contracts';
import type { Build, Project } from '@earmark/db';
import { driftFlagsAt, driftMargins, driftSeries } from '../repositories/drift.js';

/**
 * Drift of check margins along a branch: a passing check whose margin is now more than
 * `project.driftThresholdDb` below its best in the last `project.driftWindow` builds is flagged
 * (dB and dBFS checks only; contracts' driftFlagOf).
 */
export class DriftService {
  async series(em: EntityManager, project: Project, q: DriftQuery): Promise<DriftResponse> {
    const rows = await driftMargins(em, project, { branch: q.branch, window: project.driftWindow, until: null, only: q });
    return { branch: q.branch, window: project.driftWindow, thresholdDb: project.driftThresholdDb, series: driftSeries(rows, project.driftThresholdDb) };
  }

  /** Flags for the window ending at `build` on its branch; none for a build without a branch. */
  flagsAt(em: EntityManager, project: Project, build: Build): Promise<DriftFlag[]> {
    return driftFlagsAt(em, project, build);
  }
}
