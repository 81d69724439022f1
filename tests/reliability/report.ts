import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { z } from 'zod';
import { describeSizes } from './support/mode.js';
import { readFigures, resultsDir, type Figure } from './support/results.js';

/**
 * Writes docs/reliability.md from the figures the last full run recorded (.data/reliability/full),
 * the test outcomes vitest wrote there (vitest.json), the machine and the commit, followed by
 * the hand-kept notes (tests/reliability/notes.md). Run by `npm run test:reliability` after vitest.
 */
const here = path.dirname(fileURLToPath(import.meta.url));
const repoRoot = path.resolve(here, '../..');

const VitestJson = z.object({
  testResults: z.array(
    z.object({
      name: z.string(),
      assertionResults: z.array(z.object({ fullName: z.string(), status: z.string(), duration: z.number().nullish() })),
    }),
  ),
});

const PART_TITLES: Record<string, string> = {
  load: 'Load',
  soak: 'Soak',
  faults: 'Faults',
  hostile: 'Hostile input: attack requests',
  fuzz: 'Hostile input: fuzzed WAVs',
  security: 'Security',
};

/** The commit checked out, read from .git without running git. */
function currentCommit(): string {
  try {
    const gitDir = path.join(repoRoot, '.git');
    const head = fs.readFileSync(path.join(gitDir, 'HEAD'), 'utf8').trim();
    if (!head.startsWith('ref: ')) return head;
    const ref = head.slice(5);
    const loose = path.join(gitDir, ref);
    if (fs.existsSync(loose)) return `${fs.readFileSync(loose, 'utf8').trim()} (${ref.replace('refs/heads/', '')})`;
    const packed = fs.readFileSync(path.join(gitDir, 'packed-refs'), 'utf8').split('\n').find((l) => l.endsWith(` ${ref}`));
    return packed ? `${packed.split(' ')[0]} (${ref.replace('refs/heads/', '')})` : ref;
  } catch {
    return 'unknown';
  }
}

function verdict(f: Figure): string {
  if (!f.target || f.value === null) return '';
  const ok = f.target.kind === 'max' ? f.value <= f.target.value : f.value >= f.target.value;
  return ok ? 'pass' : '**miss**';
}

const fmt = (v: number | null, unit: string) => (v === null ? '—' : `${v.toLocaleString('en-US', { maximumFractionDigits: 3 })}${unit ? ` ${unit}` : ''}`);
const targetText = (f: Figure) => (f.target ? `${f.target.kind === 'max' ? '≤' : '≥'} ${f.target.value}${f.unit ? ` ${f.unit}` : ''}` : '');
const cell = (s: string) => s.replace(/\|/g, '\\|').replace(/\n/g, ' ');

export function renderReport(opts: { figures: Figure[]; vitest: z.infer<typeof VitestJson> | null; sizes: string; date: Date; notes: string }): string {
  const cpus = os.cpus();
  const lines = [
    '# Reliability',
    '',
    'Written by `npm run test:reliability` (tests/reliability; how it works: DEVELOPERS.md, "Reliability suite"). Do not edit the figures by hand; the notes at the end come from `tests/reliability/notes.md`.',
    '',
    `- Date: ${opts.date.toISOString().replace('T', ' ').slice(0, 16)} UTC`,
    `- Machine: ${cpus.length} cores (${cpus[0]?.model.trim() ?? 'unknown CPU'}), ${Math.round(os.totalmem() / 2 ** 30)} GiB RAM, ${os.platform()} ${os.release()}, Node ${process.version}`,
    `- Commit: ${currentCommit()} (with whatever uncommitted changes the tree held)`,
    `- Sizes of the last run: ${opts.sizes} (each part's figures come from the last run of its file; its notes give the size used)`,
  ];
  if (opts.vitest) {
    const all = opts.vitest.testResults.flatMap((f) => f.assertionResults.map((a) => ({ ...a, file: path.basename(f.name) })));
    const failed = all.filter((a) => a.status === 'failed').map((a) => `${a.file} › ${a.fullName}`);
    lines.push(`- Assertions: ${all.filter((a) => a.status === 'passed').length} tests passed, ${failed.length} failed${failed.length ? `:\n${failed.map((f) => `  - ${f}`).join('\n')}` : ''}`);
  }
  const parts = [...new Set(opts.figures.map((f) => f.part))].sort((a, b) => Object.keys(PART_TITLES).indexOf(a) - Object.keys(PART_TITLES).indexOf(b));
  for (const part of parts) {
    lines.push('', `## ${PART_TITLES[part] ?? part}`, '', '| Figure | Value | Target | Result | Note |', '|---|---|---|---|---|');
    for (const f of opts.figures.filter((x) => x.part === part)) lines.push(`| ${cell(f.name)} | ${fmt(f.value, f.unit)} | ${targetText(f)} | ${verdict(f)} | ${cell(f.note ?? '')} |`);
  }
  if (parts.length === 0) lines.push('', 'No figures were recorded: run `npm run test:reliability`.');
  if (opts.notes.trim()) lines.push('', opts.notes.trim());
  return `${lines.join('\n')}\n`;
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  // One vitest JSON per run (a run may cover one file): the newest outcome of each test file wins.
  const runs = fs.existsSync(resultsDir) ? fs.readdirSync(resultsDir).filter((f) => /^vitest-\d+\.json$/.test(f)).sort() : [];
  const latest = new Map<string, z.infer<typeof VitestJson>['testResults'][number]>();
  for (const run of runs) {
    for (const file of VitestJson.parse(JSON.parse(fs.readFileSync(path.join(resultsDir, run), 'utf8'))).testResults) {
      if (file.assertionResults.some((a) => a.status === 'passed' || a.status === 'failed')) latest.set(file.name, file);
    }
  }
  const vitest = runs.length ? { testResults: [...latest.values()] } : null;
  const notesFile = path.join(here, 'notes.md');
  const out = path.join(repoRoot, 'docs', 'reliability.md');
  fs.writeFileSync(
    out,
    renderReport({
      figures: readFigures(),
      vitest,
      sizes: describeSizes(),
      date: new Date(),
      notes: fs.existsSync(notesFile) ? fs.readFileSync(notesFile, 'utf8') : '',
    }),
  );
  console.log(`earmark: wrote ${path.relative(repoRoot, out)}`);
}
