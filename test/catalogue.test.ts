// The rule catalogue: codes unique and well formed, every code documented in docs/rules.md.
import * as fs from 'node:fs';
import * as path from 'node:path';
import { describe, expect, it } from 'vitest';
import { RULES } from '../server/src/findings/catalogue';
import { rulesMarkdown } from '../scripts/rules-doc';

describe('rule catalogue', () => {
  it('has unique, kebab-case codes with a title and an explanation', () => {
    const codes = Object.keys(RULES);
    expect(new Set(codes).size).toBe(codes.length);
    for (const [code, r] of Object.entries(RULES)) {
      expect(code).toMatch(/^[a-z]+(-[a-z]+)*$/);
      expect(r.title.length).toBeGreaterThan(3);
      expect(r.explanation.length).toBeGreaterThan(40);
    }
  });
  it('contains the codes of the interface contract', () => {
    for (const c of ['floating-node', 'retention-short', 'charge-sharing', 'coupling-noise', 'combined-droop', 'undriven-net', 'contention', 'keeper-weak', 'keeper-strong', 'clock-unknown', 'syntax', 'unknown-subckt', 'pin-count', 'unknown-model', 'param-error', 'include-missing', 'recursive-subckt']) {
      expect(RULES).toHaveProperty(c);
    }
  });
  it('docs/rules.md is generated from the catalogue (run `node scripts/build-rules-doc.mjs`)', () => {
    expect(fs.readFileSync(path.join(__dirname, '../docs/rules.md'), 'utf8')).toBe(rulesMarkdown());
  });
});
