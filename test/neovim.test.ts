// A third-party editor as the client: headless Neovim (Debian's `neovim`, installed by .ci/run)
// attaches the bundled server to each sample through test/support/nvim-attach.lua and prints the
// diagnostics it received; they must be the CLI's findings for that file, line for line.

import { spawnSync } from 'node:child_process';
import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { describe, expect, it, onTestFinished } from 'vitest';

const ROOT = path.join(__dirname, '..');
const SERVER = path.join(ROOT, 'dist', 'server.js');
const CLI = path.join(ROOT, 'dist', 'cli.js');
const nvim = spawnSync('nvim', ['--version'], { encoding: 'utf8' });
const haveNvim = nvim.status === 0;
// CI installs Neovim, so there this test always runs; elsewhere it needs `apt-get install neovim`
const mustRun = process.env['CI'] === 'true';

interface Seen {
  line: number;
  column: number;
  code: string;
  severity: number;
  message: string;
}

const SEVERITY: Record<string, number> = { error: 1, warning: 2, info: 3 };

describe.skipIf(!haveNvim && !mustRun)('Neovim as the LSP client', () => {
  for (const sample of ['tern_buses.sp', 'tern_dynamic_flop.sp', 'tern_domino_adder.sp']) {
    it(`receives the CLI's findings for ${sample}`, () => {
      expect(haveNvim, 'nvim is not installed').toBe(true);
      const file = path.join(ROOT, 'samples', sample);
      const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-nvim-'));
      onTestFinished(() => fs.rmSync(dir, { recursive: true, force: true }));
      const out = path.join(dir, 'diagnostics.json');
      const r = spawnSync('nvim', ['--headless', '-u', 'NONE', '-i', 'NONE', '-n', '-c', `luafile ${path.join(__dirname, 'support', 'nvim-attach.lua')}`, file], {
        env: { ...process.env, TIDEMARK_SERVER: SERVER, TIDEMARK_OUT: out },
        encoding: 'utf8',
        timeout: 60_000,
      });
      expect(r.status, r.stderr).toBe(0);
      const seen = (JSON.parse(fs.readFileSync(out, 'utf8')) as Seen[]).map((d) => `${d.line}:${d.column} ${d.severity} ${d.code} ${d.message}`).sort();
      const cli = spawnSync(process.execPath, [CLI, 'check', file, '--format', 'json', '--fail-on', 'never'], { encoding: 'utf8' });
      const report = JSON.parse(cli.stdout) as { diagnostics: Array<{ file: string; line: number; column: number; severity: string; rule: string; message: string; accepted?: unknown }> };
      const expected = report.diagnostics
        .filter((d) => path.resolve(d.file) === file && !d.accepted)
        .map((d) => `${d.line}:${d.column} ${SEVERITY[d.severity]} ${d.rule} ${d.message}`)
        .sort();
      expect(expected.length).toBeGreaterThan(0);
      expect(seen).toEqual(expected);
    }, 90_000);
  }
});
