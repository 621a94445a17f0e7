// Shared by the tests of the editor's quick paths: the disk with one file replaced (an editor
// buffer), and the whole JSON report of a result as plain data, to compare two results.

import * as path from 'node:path';
import { diskHost } from '../../server/src/cli/diskHost';
import type { FileHost } from '../../server/src/core/host';
import type { AnalysisResult } from '../../server/src/engine';
import { addToReport, emptyReport } from '../../server/src/findings/report';

export function overlay(file: string, text: string): FileHost {
  const disk = diskHost();
  return { ...disk, readFile: (p) => (path.resolve(p) === path.resolve(file) ? text : disk.readFile(p)) };
}

export function report(file: string, r: AnalysisResult): unknown {
  const rep = emptyReport();
  addToReport(rep, file, r, { allNodes: true });
  return JSON.parse(JSON.stringify(rep));
}
