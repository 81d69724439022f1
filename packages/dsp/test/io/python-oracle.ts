// Runs python3 with numpy/scipy as an outside oracle for the tests. Arrays travel as raw
// little-endian float64 files in a temporary directory; the script prints one JSON value.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

let available: boolean | undefined;

/** True when python3 can import numpy and scipy (checked once). */
export function hasPythonScipy(): boolean {
  if (available === undefined) {
    const r = spawnSync('python3', ['-c', 'import numpy, scipy.io.wavfile, scipy.signal'], { encoding: 'utf8' });
    available = r.status === 0;
  }
  return available;
}

/**
 * Runs `script` with `inputs` loaded as numpy arrays named in the dict `IN` and `files`
 * (paths of byte inputs) in `FILES`; the script must print one JSON document.
 */
export function runPython(
  script: string,
  inputs: Record<string, Float64Array> = {},
  files: Record<string, Uint8Array> = {},
): unknown {
  const dir = mkdtempSync(join(tmpdir(), 'earmark-oracle-'));
  try {
    const arrays: Record<string, string> = {};
    for (const [name, values] of Object.entries(inputs)) {
      const path = join(dir, `${name}.f64`);
      writeFileSync(path, new Uint8Array(values.buffer, values.byteOffset, values.byteLength));
      arrays[name] = path;
    }
    const filePaths: Record<string, string> = {};
    for (const [name, bytes] of Object.entries(files)) {
      const path = join(dir, name);
      writeFileSync(path, bytes);
      filePaths[name] = path;
    }
    const prelude = [
      'import json, sys, warnings',
      'import numpy as np',
      'warnings.simplefilter("ignore")',
      `IN = {k: np.fromfile(v, dtype="<f8") for k, v in json.loads(${JSON.stringify(JSON.stringify(arrays))}).items()}`,
      `FILES = json.loads(${JSON.stringify(JSON.stringify(filePaths))})`,
    ].join('\n');
    const r = spawnSync('python3', ['-c', `${prelude}\n${script}`], { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
    if (r.status !== 0) throw new Error(`python oracle failed: ${r.stderr}`);
    return JSON.parse(r.stdout) as unknown;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
