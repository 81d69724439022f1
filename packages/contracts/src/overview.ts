import { z } from 'zod';
import { BuildStatus } from './builds.js';
import { VerdictCounts } from './dashboard.js';
import { DriftFlag } from './mask-derivation.js';

/** The branch whose state answers "are we green". Earmark has no per-project setting for it yet. */
export const MAIN_BRANCH = 'main';

/** A build named by its commit, as a point on a branch's history. */
export const BuildRef = z.object({ sha: z.string(), createdAt: z.string() });
export type BuildRef = z.infer<typeof BuildRef>;

export const TrendMark = BuildRef.extend({ status: BuildStatus });
export type TrendMark = z.infer<typeof TrendMark>;

/** A branch's newest builds, oldest first (the last one is its current verdict). */
export const BranchTrend = z.object({
  branch: z.string(),
  latest: TrendMark,
  marks: z.array(TrendMark),
  /** Builds the branch has in all. */
  builds: z.number().int(),
});
export type BranchTrend = z.infer<typeof BranchTrend>;

/** A check failing in main's newest capture of its test case × target, and since which build. */
export const FailingCheck = z.object({
  testCase: z.string(),
  target: z.string(),
  checkId: z.string(),
  /** The mask's name for the check (null when it has none). */
  label: z.string().nullable(),
  kind: z.string().nullable(),
  margin: z.number().nullable(),
  unit: z.string().nullable(),
  worstHz: z.number().nullable(),
  /** The newest failing capture and its build. */
  captureId: z.string(),
  latest: BuildRef,
  /** The first build of the current failing streak on main. */
  since: BuildRef,
  /** Builds in the streak (the same cell captured and failing this check). */
  streak: z.number().int(),
});
export type FailingCheck = z.infer<typeof FailingCheck>;

/** Work the viewer may decide: a mask revision in review or a waiver request, neither theirs. */
export const AwaitingItem = z.object({
  kind: z.enum(['revision', 'waiver']),
  id: z.string(),
  testCase: z.string(),
  /** Revision number, or the waived check. */
  subject: z.string(),
  requestedBy: z.string(),
  requestedAt: z.string(),
});
export type AwaitingItem = z.infer<typeof AwaitingItem>;

/** GET /api/projects/:project/overview — the project's landing page in one answer. */
export const ProjectOverview = z.object({
  mainBranch: z.string(),
  /** Main's newest build with its verdict counts; null before main has one. */
  main: z
    .object({ sha: z.string(), status: BuildStatus, createdAt: z.string(), counts: VerdictCounts })
    .nullable(),
  /** Main first, then the other branches by their newest build. */
  branches: z.array(BranchTrend),
  failing: z.array(FailingCheck),
  /** Checks on main that still pass but whose margin shrank past the project's drift threshold. */
  drifting: z.array(DriftFlag),
  /** What the viewer may decide now (empty for roles that decide nothing). */
  awaiting: z.array(AwaitingItem),
  counts: z.object({
    /** Reviews and waiver requests the viewer may decide. */
    awaitingYou: z.number().int(),
    /** Findings open or under investigation on main. */
    openFindingsOnMain: z.number().int(),
  }),
});
export type ProjectOverview = z.infer<typeof ProjectOverview>;
