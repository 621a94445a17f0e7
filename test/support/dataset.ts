// Access to the open cell library in ../shared/datasets/sky130_fd_sc_hd (Apache-2.0, The
// SkyWater PDK Authors; see that folder's README and LICENSE).

import * as fs from 'node:fs';
import * as path from 'node:path';

export const DATASET_DIR = path.resolve(__dirname, '../../../shared/datasets/sky130_fd_sc_hd');

export function datasetAvailable(): boolean {
  return fs.existsSync(path.join(DATASET_DIR, 'cells.json'));
}

export function cellNames(): string[] {
  return fs
    .readdirSync(path.join(DATASET_DIR, 'spice'))
    .filter((f) => f.endsWith('.spice'))
    .map((f) => f.replace(/\.spice$/, ''))
    .sort();
}

export function cellFile(cell: string, dialect: 'spice' | 'cdl'): string {
  return path.join(DATASET_DIR, dialect, `${cell}.${dialect}`);
}
