// The editor's progress indicator over the real protocol: a client with work-done progress sees
// "analysing <file>" begin while a long full analysis runs (opening the 30k datapath) and end
// once it is done; a short one (a small sample) shows none, nor does a comment line put in (the
// analysis moves with it). A client without the capability gets no progress requests at all.

import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { TestLspClient } from './support/lspClient';
import { hierarchicalNetlist } from '../scripts/netlists';

interface ProgressEvent {
  token: string | number;
  value: { kind: 'begin' | 'report' | 'end'; title?: string; message?: string };
  at: number;
}

describe('progress of a long analysis', () => {
  let dir: string;
  let big: string;
  const small = path.join(__dirname, '..', 'samples', 'tern_dynamic_latch.sp');
  beforeAll(() => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-progress-'));
    big = path.join(dir, 'datapath.sp');
    fs.writeFileSync(big, hierarchicalNetlist(30_000));
  });
  afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

  it('begins while the 30k datapath is analysed and ends when it is done; none for a small sample', async () => {
    const client = new TestLspClient();
    const created: Array<string | number> = [];
    const events: ProgressEvent[] = [];
    client.conn.onRequest('window/workDoneProgress/create', (p: { token: string | number }) => {
      created.push(p.token);
      return null;
    });
    client.conn.onNotification('$/progress', (p: { token: string | number; value: ProgressEvent['value'] }) => {
      events.push({ ...p, at: Date.now() });
    });
    await client.conn.sendRequest('initialize', { processId: process.pid, rootUri: pathToFileURL(dir).toString(), capabilities: { window: { workDoneProgress: true } }, workspaceFolders: null });
    await client.conn.sendNotification('initialized', {});

    const smallUri = pathToFileURL(small).toString();
    const smallDone = client.diagnosticsFor(smallUri);
    const openedAt = Date.now();
    await client.open(smallUri, fs.readFileSync(small, 'utf8'));
    await smallDone;
    // (the indicator comes after 300 ms of analysis: a machine busy enough to take longer on
    // the sample may show it, as it should)
    if (Date.now() - openedAt < 300) expect(created, 'a short analysis shows no progress').toEqual([]);
    created.length = 0;
    events.length = 0;

    const uri = pathToFileURL(big).toString();
    const published = client.diagnosticsFor(uri);
    await client.open(uri, fs.readFileSync(big, 'utf8'));
    await published;
    const publishedAt = Date.now();
    // the end follows the run's last slice
    for (let i = 0; i < 50 && !events.some((e) => e.value.kind === 'end'); i++) await new Promise((r) => setTimeout(r, 20));
    expect(created.length).toBe(1);
    const mine = events.filter((e) => e.token === created[0]);
    expect(mine.map((e) => e.value.kind)).toEqual(['begin', 'end']);
    expect(mine[0]!.value.title).toBe('Tidemark');
    expect(mine[0]!.value.message).toBe('analysing datapath.sp');
    expect(mine[0]!.at).toBeLessThanOrEqual(publishedAt);

    // a comment line put in: the findings move and the analysis moves with them, so a hover right
    // after is answered from it, and no full analysis runs (it would show progress, as above)
    created.length = 0;
    const lines = fs.readFileSync(big, 'utf8').split('\n');
    const at = lines.findIndex((l) => l.startsWith('Mpre dyn'));
    await client.change(uri, [...lines.slice(0, at), '* precharge', ...lines.slice(at)].join('\n'), 2);
    const hover = (await client.conn.sendRequest('textDocument/hover', { textDocument: { uri }, position: { line: at + 1, character: 6 } })) as { contents: { value: string } } | null;
    expect(hover?.contents.value).toMatch(/\*\*xb0\.xs0\.xd0\.dyn\*\* — storage node/);
    // past the debounce, when a full analysis would start
    await new Promise((r) => setTimeout(r, 1000));
    expect(created, 'no full analysis after a comment line').toEqual([]);
    await client.shutdown();
  }, 120_000);

  it('a client without work-done progress is sent no progress', async () => {
    const client = new TestLspClient();
    const requests: string[] = [];
    client.conn.onRequest('window/workDoneProgress/create', () => {
      requests.push('create');
      return null;
    });
    await client.initialize(pathToFileURL(dir).toString());
    const uri = pathToFileURL(big).toString();
    const published = client.diagnosticsFor(uri);
    await client.open(uri, fs.readFileSync(big, 'utf8'));
    await published;
    expect(requests).toEqual([]);
    await client.shutdown();
  }, 120_000);
});
