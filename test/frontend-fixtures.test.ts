// Runs every netlist under test/fixtures/frontend: expected findings are written in the files
// (see test/support/fixtures.ts), the elaborated summary in <name>.expect.json where present.

import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, it } from 'vitest';
import { analyse } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';
import { checkExpectations, checkSummary, summarise } from './support/fixtures';

const DIR = path.join(__dirname, 'fixtures', 'frontend');
const TOP_LEVEL = /\.(sp|cir|cdl|spice)$/;

describe('front-end fixtures', () => {
  for (const name of fs.readdirSync(DIR).filter((f) => TOP_LEVEL.test(f)).sort()) {
    it(name, () => {
      const file = path.join(DIR, name);
      const text = fs.readFileSync(file, 'utf8');
      const result = analyse(diskHost(), file, { frontEndOnly: true });
      // expectations written in included files count too
      const others: Record<string, string> = {};
      for (const f of result.design.files) if (f !== file) others[f] = fs.readFileSync(f, 'utf8');
      checkExpectations(file, text, result, others);
      checkSummary(file.replace(TOP_LEVEL, '.expect.json'), summarise(result));
    });
  }
});
