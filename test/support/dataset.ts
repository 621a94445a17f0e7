// Access to the open cell library in ../shared/datasets/sky130_fd_sc_hd (Apache-2.0, The
// SkyWater PDK Authors; see that folder's README and LICENSE).

import * as fs from 'node:fs';
import * as path from 'node:path';

export const DATASET_DIR = path.resolve(__dirname, '../../../shared/datasets/sky130_fd_sc_hd');

/** True when the dataset is beside the project; CI (CI=true) always has it, so there it must be. */
export function datasetAvailable(): boolean {
  const ok = fs.existsSync(path.join(DATASET_DIR, 'cells.json'));
  if (!ok && process.env['CI']) throw new Error(`dataset missing at ${DATASET_DIR}`);
  return ok;
}

export function cellNames(): string[] {
  if (!datasetAvailable()) return [];
  return fs
    .readdirSync(path.join(DATASET_DIR, 'spice'))
    .filter((f) => f.endsWith('.spice'))
    .map((f) => f.replace(/\.spice$/, ''))
    .sort();
}

export function cellFile(cell: string, dialect: 'spice' | 'cdl'): string {
  return path.join(DATASET_DIR, dialect, `${cell}.${dialect}`);
}
