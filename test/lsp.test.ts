// The real bundled language server over its real protocol (stdio), from a test client built on
// vscode-jsonrpc.

import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { TestLspClient } from './support/lspClient';

describe('language server over stdio', () => {
  let client: TestLspClient;
  let dir: string;
  beforeAll(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-lsp-'));
    client = new TestLspClient();
    await client.initialize(pathToFileURL(dir).toString());
  });
  afterAll(async () => {
    await client.shutdown();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('publishes front-end diagnostics on open and updates them on change', async () => {
    const file = path.join(dir, 'a.sp');
    const uri = pathToFileURL(file).toString();
    const first = client.diagnosticsFor(uri);
    await client.open(uri, 'deck\n.model nch nmos level=1\nM1 y a 0 0 nch w={1u l=1u\n.end\n');
    const d = await first;
    expect(d.diagnostics).toMatchObject([{ code: 'syntax', severity: 1, range: { start: { line: 2, character: 17 } } }]);
    const fixed = client.diagnosticsFor(uri, (p) => !p.diagnostics.some((d) => d.code === 'syntax'));
    await client.change(uri, 'deck\n.model nch nmos level=1\nM1 y a 0 0 nch w={1u} l=1u\n.end\n', 2);
    expect((await fixed).diagnostics.filter((d) => d.code === 'syntax')).toEqual([]);
  });

  it('puts diagnostics of an included file on that file', async () => {
    fs.writeFileSync(path.join(dir, 'models.inc'), '* models\n.model nch nmos level=1\n.param bad={nope}\n');
    const file = path.join(dir, 'top.sp');
    const uri = pathToFileURL(file).toString();
    const incUri = pathToFileURL(path.join(dir, 'models.inc')).toString();
    const inc = client.diagnosticsFor(incUri, (p) => p.diagnostics.length > 0);
    await client.open(uri, 'top\n.include models.inc\nM1 y a 0 0 nch w=1u l=1u\n.end\n');
    expect((await inc).diagnostics).toMatchObject([{ code: 'param-error', range: { start: { line: 2 } } }]);
  });
});
