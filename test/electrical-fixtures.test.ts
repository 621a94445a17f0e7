// Electrical findings on fixtures (test/fixtures/electrical): expectations written beside the
// lines, as in the front-end fixtures. The cards are the generic BSIM4 test cards.
import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, it } from 'vitest';
import { analyse } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';
import { checkExpectations } from './support/fixtures';

const DIR = path.join(__dirname, 'fixtures', 'electrical');

describe('electrical fixtures', () => {
  for (const name of fs.readdirSync(DIR).filter((f) => f.endsWith('.sp')).sort()) {
    it(name, () => {
      const file = path.join(DIR, name);
      checkExpectations(file, fs.readFileSync(file, 'utf8'), analyse(diskHost(), file));
    });
  }
});
