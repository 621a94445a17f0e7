// The server under edits on a netlist large enough that an analysis takes many slices: edits that
// change no meaning are answered by carrying the findings over (exactly what a re-analysis
// gives), requests are served while an analysis runs, a burst of edits ends with the findings
// of the last text, hovers answer from the analysis of the current text, and a run of device
// edits followed by a pause ends as a fresh analysis would.

import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { TestLspClient, type PublishedDiagnostics } from './support/lspClient';
import { hierarchicalNetlist } from '../scripts/netlists';
import { analyse } from '../server/src/engine';
import { memoryHost } from '../server/src/core/host';
import { locate } from '../server/src/service/locate';
import { netHover } from '../server/src/service/hover';
import { CELLS_INC, topIncludingCells } from './support/included';

/** What the engine itself finds for a text, in the shape the server publishes (line, rule, message). */
function engineFindings(file: string, text: string): string[] {
  return analyse(memoryHost({ [file]: text }), file)
    .diagnostics.filter((d) => d.file === file)
    .map((d) => `${d.range.start.line}:${d.range.start.character} ${d.rule} ${d.accepted ? `accepted: "${d.accepted.reason}". ` : ''}${d.message}`);
}
const published = (p: PublishedDiagnostics) => p.diagnostics.map((d) => `${d.range.start.line}:${d.range.start.character} ${d.code} ${d.message}`);

describe('incremental and responsive analysis over the real protocol', () => {
  let client: TestLspClient;
  let dir: string;
  let file: string;
  let uri: string;
  const text = hierarchicalNetlist(30_000);
  let first: PublishedDiagnostics;
  /** The document's text after the tests so far. */
  let current = text;
  beforeAll(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-inc-'));
    file = path.join(dir, 'datapath.sp');
    fs.writeFileSync(file, text);
    uri = pathToFileURL(file).toString();
    client = new TestLspClient();
    await client.initialize(pathToFileURL(dir).toString());
    const next = client.diagnosticsFor(uri);
    await client.open(uri, text);
    first = await next;
  }, 120_000);
  afterAll(async () => {
    await client.shutdown();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  /** The document changed to `edited`: the diagnostics it settles on are a fresh analysis's. */
  async function changeSettlesAsFresh(edited: string, version: number): Promise<void> {
    const expected = engineFindings(file, edited);
    const answered = client.diagnosticsFor(uri, (p) => published(p).join('\n') === expected.join('\n'));
    await client.change(uri, edited, version);
    expect(published(await answered)).toEqual(expected);
  }

  /** A hover on a net of `text` (the document's text now) answers as a fresh analysis of it does. */
  async function hoverIsFresh(text: string, position: { line: number; character: number }): Promise<void> {
    const hover = (await client.conn.sendRequest('textDocument/hover', { textDocument: { uri }, position })) as { contents: { value: string } } | null;
    const fresh = analyse(memoryHost({ [file]: text }), file);
    const spot = locate(fresh.deck.files.find((x) => x.file === file)!, position);
    expect(spot?.kind).toBe('net');
    expect(hover?.contents.value).toBe(netHover(fresh, file, spot as Extract<NonNullable<typeof spot>, { kind: 'net' }>));
  }

  it('carries findings over a comment line, moved to their new lines, equal to a re-analysis', async () => {
    expect(first.diagnostics.length).toBeGreaterThan(0);
    const lines = text.split('\n');
    const at = lines.findIndex((l) => l.startsWith('.subckt b_domino'));
    lines.splice(at, 0, '* Tern datapath: domino cells reviewed');
    const edited = lines.join('\n');
    const next = client.diagnosticsFor(uri);
    await client.change(uri, edited, 2);
    const moved = await next;
    const dynLine = lines.findIndex((l) => l.startsWith('Mpre dyn'));
    const expected = first.diagnostics.map((d) => `${d.range.start.line >= at ? d.range.start.line + 1 : d.range.start.line}:${d.range.start.character} ${d.code} ${d.message}`);
    expect(published(moved)).toEqual(expected);
    expect(published(moved)).toEqual(engineFindings(file, edited));
    // the hover answers from the analysis of this text (the node's line moved by one)
    await hoverIsFresh(edited, { line: dynLine, character: 6 });
    current = edited;
  }, 120_000);

  it('a comment typed key by key, then a width below it: each answered from the analysis moved with the comment, ending as a fresh analysis', async () => {
    const lines = current.split('\n');
    const at = lines.findIndex((l) => l.startsWith('.subckt b_dlatch'));
    let version = 3;
    // a new line, then the comment typed into it (no line moves after the first key)
    for (const typed of ['', '*', '* la', '* latch cell']) {
      const now = [...lines.slice(0, at), typed, ...lines.slice(at)];
      const next = client.diagnosticsFor(uri);
      await client.change(uri, now.join('\n'), version++);
      expect(published(await next)).toEqual(engineFindings(file, now.join('\n')));
    }
    const withComment = [...lines.slice(0, at), '* latch cell', ...lines.slice(at)];
    const width = withComment.findIndex((l) => l.startsWith('Mtp d clkb st'));
    withComment[width] = withComment[width]!.replace('w=0.6u', 'w=0.8u');
    const edited = withComment.join('\n');
    await changeSettlesAsFresh(edited, version++);
    await hoverIsFresh(edited, { line: withComment.findIndex((l) => l.startsWith('Mtn d clk st')), character: 10 });
    current = edited;
  }, 120_000);

  it('answers a request while an analysis runs, and a burst of edits ends with the last text findings', async () => {
    const lines = text.split('\n');
    const target = lines.findIndex((l) => l.startsWith('Mkp dyn out'));
    let last = '';
    let version = 10;
    // five edits in a row, each changing the keeper's length; only the last one matters
    for (const l of ['0.2u', '0.3u', '0.25u', '0.12u', '0.4u']) {
      lines[target] = `Mkp dyn out vdd vdd bp w=0.15u l=${l}`;
      last = lines.join('\n');
      await client.change(uri, last, version++);
    }
    const settled = client.diagnosticsFor(uri, (p) => published(p).join('\n') === engineFindings(file, last).join('\n'));
    // past the debounce the analysis is under way: the outline is answered before it ends
    await new Promise((r) => setTimeout(r, 80));
    let answeredFirst = false;
    let done = false;
    const symbols = client.conn.sendRequest('textDocument/documentSymbol', { textDocument: { uri } }).then((s) => {
      answeredFirst = !done;
      return s;
    });
    const final = await settled;
    done = true;
    expect(Array.isArray(await symbols)).toBe(true);
    expect(answeredFirst, 'the outline did not wait for the analysis').toBe(true);
    expect(published(final)).toEqual(engineFindings(file, last));
    // the hover answers from the analysis of the last text (a size edit answered from the
    // previous analysis): the same card a fresh analysis gives
    const dynLine = lines.findIndex((l) => l.startsWith('Mpre dyn'));
    const hover = (await client.conn.sendRequest('textDocument/hover', { textDocument: { uri }, position: { line: dynLine, character: 6 } })) as { contents: { value: string } } | null;
    const fresh = analyse(memoryHost({ [file]: last }), file);
    const f = fresh.deck.files.find((x) => x.file === file)!;
    const spot = locate(f, { line: dynLine, character: 6 });
    expect(spot?.kind).toBe('net');
    expect(hover?.contents.value).toBe(netHover(fresh, file, spot as Extract<NonNullable<typeof spot>, { kind: 'net' }>));
    expect(client.proc.exitCode).toBeNull();
  }, 120_000);

  it('a reconnection is answered from the previous analysis: the findings and the hover a fresh analysis gives', async () => {
    const before = text.split('\n');
    const target = before.findIndex((l) => l.startsWith('Xb1 a1 '));
    const lines = [...before];
    // the keeper length the burst left, then a block input moved to another net
    lines[lines.findIndex((l) => l.startsWith('Mkp dyn out'))] = 'Mkp dyn out vdd vdd bp w=0.15u l=0.4u';
    lines[target] = lines[target]!.replace('Xb1 a1 ', 'Xb1 a3 ');
    const edited = lines.join('\n');
    await changeSettlesAsFresh(edited, 40);
    current = edited;
    await hoverIsFresh(edited, { line: target, character: 5 });
    expect(client.proc.exitCode).toBeNull();
  }, 120_000);

  it('transistor lines added and deleted: each edit ends with the findings of a fresh analysis, and after the editor is still (the idle-time analysis replaces the chain of quick answers) a hover answers as a fresh analysis does', async () => {
    let version = 50;
    let lines = current.split('\n');
    const edits: string[] = [];
    for (let k = 0; k < 6; k++) {
      if (k % 3 === 2) lines = lines.filter((l) => !l.startsWith(`Mk${k - 2} `));
      else lines.splice(lines.findIndex((l) => l.startsWith(`Xs${k + 2} `)) + 1, 0, `Mk${k} w${k + 2} clk vdd vdd bp w=0.2u l=0.1u`);
      edits.push(lines.join('\n'));
    }
    for (const edited of edits) await changeSettlesAsFresh(edited, version++);
    const last = edits[edits.length - 1]!;
    // the server's idle-time analysis runs; a hover afterwards answers as a fresh analysis does
    await new Promise((r) => setTimeout(r, 3_000));
    await hoverIsFresh(last, { line: last.split('\n').findIndex((l) => l.startsWith('Mpre dyn')), character: 6 });
    expect(client.proc.exitCode).toBeNull();
  }, 120_000);

  it('a device added to the domino cell (1,260 copies, over what an edit may patch): the full analysis starts from the design built from the previous one, and its findings and a hover are a fresh analysis\'s', async () => {
    const edited = current.replace(/^(Mkp dyn out.*)$/m, '$1\nMx dyn clk vdd vdd bp w=0.1u l=0.1u');
    expect(edited).not.toBe(current);
    await changeSettlesAsFresh(edited, 80);
    current = edited;
    await hoverIsFresh(edited, { line: edited.split('\n').findIndex((l) => l.startsWith('Mx dyn')), character: 4 });
    expect(client.proc.exitCode).toBeNull();
  }, 120_000);

  it('the supply\'s volts edited: answered from the previous analysis (phases and classification kept, every estimate redone), with a fresh analysis\'s findings and hover', async () => {
    const edited = current.replace(/^vdd vdd 0 1\.0$/m, 'vdd vdd 0 0.9');
    expect(edited).not.toBe(current);
    await changeSettlesAsFresh(edited, 90);
    current = edited;
    await hoverIsFresh(edited, { line: edited.split('\n').findIndex((l) => l.startsWith('Mpre dyn')), character: 6 });
    expect(client.proc.exitCode).toBeNull();
  }, 120_000);

  it('an edit in an open included file re-analyses the netlist that includes it, at once for a size edit', async () => {
    const cells = CELLS_INC;
    const top = topIncludingCells(1);
    const topFile = path.join(dir, 'top.sp');
    const cellsFile = path.join(dir, 'cells.inc');
    fs.writeFileSync(topFile, top);
    fs.writeFileSync(cellsFile, cells);
    const topUri = pathToFileURL(topFile).toString();
    const cellsUri = pathToFileURL(cellsFile).toString();
    const inContext = (cellsText: string) =>
      analyse(memoryHost({ [topFile]: top, [cellsFile]: cellsText }), topFile)
        .diagnostics.filter((d) => d.file === cellsFile)
        .map((d) => `${d.range.start.line}:${d.range.start.character} ${d.rule} ${d.message}`);
    // the cells file opened first is analysed on its own (its subcircuits standalone); once the
    // netlist that includes it is open, its findings are those of the cells in that netlist
    const alone = client.diagnosticsFor(cellsUri);
    await client.open(cellsUri, cells, 1);
    await alone;
    const covered = client.diagnosticsFor(cellsUri, (p) => published(p).join('\n') === inContext(cells).join('\n'));
    await client.open(topUri, top);
    await covered;
    await new Promise((r) => setTimeout(r, 300));
    const last = client.published.filter((p) => p.uri === cellsUri).at(-1)!;
    expect(published(last), 'nothing published over it afterwards').toEqual(inContext(cells));
    const edited = cells.replace('Mna dyn a n1 vss tn w=0.6u', 'Mna dyn a n1 vss tn w=0.9u');
    const expected = inContext(edited);
    const next = client.diagnosticsFor(cellsUri, (p) => published(p).join('\n') === expected.join('\n'));
    await client.change(cellsUri, edited, 2);
    expect(published(await next)).toEqual(expected);
    // closing the netlist hands the cells file back to its own analysis
    const alone2 = analyse(memoryHost({ [cellsFile]: edited }), cellsFile)
      .diagnostics.filter((d) => d.file === cellsFile)
      .map((d) => `${d.range.start.line}:${d.range.start.character} ${d.rule} ${d.message}`);
    const own = client.diagnosticsFor(cellsUri, (p) => p.diagnostics.length > 0 && published(p).join('\n') === alone2.join('\n'));
    await client.conn.sendNotification('textDocument/didClose', { textDocument: { uri: topUri } });
    expect(published(await own)).toEqual(alone2);
  }, 120_000);
});

