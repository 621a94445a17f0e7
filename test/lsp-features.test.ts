// Editor features through the real bundled server over stdio: hover figures, the keeper quick
// fix (apply it, and the node becomes kept with the finding gone), outline, definition,
// folding, completion, and a stream of random edits that the server survives.

import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { applyEdits, TestLspClient } from './support/lspClient';
import { runNgspice } from './support/ngspice';
import { dominoDeck } from './support/domino';

/** A figure as the hover writes it (`43.6nA`, `2.95ns`), in base units. */
function parseEngineering(t: string): number {
  const m = /^(-?[\d.]+(?:e-?\d+)?)([TGMkmunpfa]?)[A-Za-z]*$/.exec(t);
  if (!m) throw new Error(`not a figure: ${t}`);
  const scale: Record<string, number> = { T: 1e12, G: 1e9, M: 1e6, k: 1e3, '': 1, m: 1e-3, u: 1e-6, n: 1e-9, p: 1e-12, f: 1e-15, a: 1e-18 };
  return Number(m[1]) * scale[m[2]!]!;
}

const MODELS = fs.readFileSync(path.join(__dirname, 'fixtures', 'electrical', 'models.inc'), 'utf8');
const DECK = dominoDeck('domino gate for the editor tests', '.control\necho not circuit\n.endc\n');

describe('editor features over the real protocol', () => {
  let client: TestLspClient;
  let dir: string;
  let uri: string;
  beforeAll(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-lspf-'));
    fs.writeFileSync(path.join(dir, 'models.inc'), MODELS);
    fs.writeFileSync(path.join(dir, 'dom.sp'), DECK);
    uri = pathToFileURL(path.join(dir, 'dom.sp')).toString();
    client = new TestLspClient();
    await client.initialize(pathToFileURL(dir).toString());
  });
  afterAll(async () => {
    await client.shutdown();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('hovers a node with its states, capacitance, leakage, retention and droop figures', async () => {
    const first = client.diagnosticsFor(uri);
    await client.open(uri, DECK);
    const d = await first;
    expect(d.diagnostics.map((x) => x.code)).toContain('floating-node');
    const hover = (await client.conn.sendRequest('textDocument/hover', { textDocument: { uri }, position: { line: 4, character: 6 } })) as { contents: { value: string } };
    const md = hover.contents.value;
    expect(md).toMatch(/\*\*xg\.dyn\*\* — storage node/);
    expect(md).toMatch(/clk=1 \| floats for some inputs \| [ab]=0/);
    expect(md).toMatch(/\*\*Capacitance\*\* [\d.]+fF/);
    expect(md).toMatch(/\| 110 C \| [\d.]+[pnu]A \| [\d.]+[munp]?s \|/);
    expect(md).toMatch(/budget/);
    expect(md).toMatch(/not sign-off/);
    // the corner tables list only the contributors that matter: each at least 1% of its row's leakage
    const amps = (t: string) => parseEngineering(t);
    const rows = md.split('\n').filter((l) => /^\| \d+ C \|/.test(l));
    expect(rows.length).toBeGreaterThan(0);
    for (const row of rows) {
      const cells = row.split('|').map((x) => x.trim());
      const total = amps(cells[2]!);
      for (const m of cells[4]!.matchAll(/ (\S+A)(?:,|$)/g)) expect(amps(m[1]!)).toBeGreaterThanOrEqual(0.01 * total);
    }
    // figures in engineering units, in the remedy's reasoning too
    expect(md).not.toMatch(/\de-\d+ ?A/);
    expect(md).toMatch(/hot-corner leakage [\d.]+[fpnu]A; the keeper supplies [\d.]+[fpnum]A/);
    const dev = (await client.conn.sendRequest('textDocument/hover', { textDocument: { uri }, position: { line: 5, character: 1 } })) as { contents: { value: string } };
    const dmd = dev.contents.value;
    expect(dmd).toMatch(/\*\*xg\.mna\*\* — n-channel/);
    // what the device leaks, a table from the largest current down
    expect(dmd).toMatch(/\| node \| holding \| corner \| mechanism \| current \|/);
    const currents = dmd.split('\n').filter((l) => /^\| xg\./.test(l)).map((l) => amps(l.split('|')[5]!.trim()));
    expect(currents.length).toBeGreaterThan(0);
    expect([...currents].sort((x, y) => y - x)).toEqual(currents);
  });

  /** Opens a sample, waits for its findings, and hovers `word` on the first line starting with `lineStart`. */
  const hoverInSample = async (sample: string, lineStart: string, word: string): Promise<string> => {
    const file = path.join(__dirname, '..', 'samples', sample);
    const text = fs.readFileSync(file, 'utf8');
    const sampleUri = pathToFileURL(file).toString();
    const opened = client.diagnosticsFor(sampleUri);
    await client.open(sampleUri, text);
    await opened;
    const lines = text.split('\n');
    const line = lines.findIndex((l) => l.startsWith(lineStart));
    const hover = (await client.conn.sendRequest('textDocument/hover', { textDocument: { uri: sampleUri }, position: { line, character: lines[line]!.indexOf(word) + 1 } })) as { contents: { value: string } };
    return hover.contents.value;
  };

  it('says what holding a memory cell would take: the capacitance for its float window, or the refresh interval', async () => {
    const md = await hoverInSample('tern_dram_array.sp', 'Macc ', ' sn ');
    const m = /\*\*To hold it\*\* through its (\S+) float window at 110 C: about (\S+) of capacitance \(it has (\S+)\), or restore \(refresh\) it at least every (\S+)/.exec(md);
    expect(m, md).not.toBeNull();
    const [windowS, neededF, hasF, everyS] = m!.slice(1).map(parseEngineering) as [number, number, number, number];
    // the retention at the hot corner in the node's table is the refresh interval, and the
    // capacitance scales with the window over it
    expect(md).toContain(`retention at 110 C ${m![4]}`);
    expect(neededF / ((hasF * windowS) / everyS)).toBeCloseTo(1, 1);
    expect(neededF).toBeGreaterThan(hasF);
  });

  it('shows a bus whose drivers can fight and that floats for other inputs with both witnesses', async () => {
    const md = await hoverInSample('tern_buses.sp', 'Xadc ', 'rbus');
    expect(md).toMatch(/\| pclk=1 \| drivers can fight, and floats for some inputs \| [^|]*en_adc=1[^|]* \(fight\); en_adc=0 en_dsp=0 \(float\) \|/);
  });

  it('lists each fix once for a line with several findings, with every finding it answers', async () => {
    const d = client.published.filter((p) => p.uri === uri).at(-1)!;
    const floating = d.diagnostics.find((x) => x.code === 'floating-node')!;
    const onLine = d.diagnostics.filter((x) => x.range.start.line === floating.range.start.line);
    expect(onLine.length).toBeGreaterThan(1);
    const actions = (await client.conn.sendRequest('textDocument/codeAction', { textDocument: { uri }, range: floating.range, context: { diagnostics: onLine } })) as Array<{ title: string; diagnostics: Array<{ code: string }> }>;
    const titles = actions.map((a) => a.title);
    expect(new Set(titles).size).toBe(titles.length);
    // the keeper answers the float and the short retention alike
    const keeper = actions.find((a) => a.title.startsWith('Insert a keeper'))!;
    expect(keeper.diagnostics.map((x) => x.code)).toEqual(expect.arrayContaining(onLine.filter((x) => x.code === 'floating-node' || x.code === 'retention-short').map((x) => x.code)));
  });

  it('inserts a sized keeper from the quick fix, and the node becomes kept', async () => {
    const d = client.published.filter((p) => p.uri === uri).at(-1)!;
    const floating = d.diagnostics.find((x) => x.code === 'floating-node')!;
    const actions = (await client.conn.sendRequest('textDocument/codeAction', { textDocument: { uri }, range: floating.range, context: { diagnostics: [floating] } })) as Array<{ title: string; edit: { changes: Record<string, Array<{ range: never; newText: string }>> } }>;
    const keeper = actions.find((a) => a.title.startsWith('Insert a keeper'))!;
    expect(keeper).toBeDefined();
    expect(actions.some((a) => a.title.startsWith('Accept floating-node'))).toBe(true);
    const edited = applyEdits(DECK, keeper.edit.changes[uri]!);
    expect(edited).toMatch(/^Mkeep_dyn dyn y vdd vdd p45 w=[\d.]+[un] l=[\d.]+[un]$/m);
    const after = client.diagnosticsFor(uri, (p) => !p.diagnostics.some((x) => x.code === 'floating-node'));
    await client.change(uri, edited, 2);
    const diags = await after;
    expect(diags.diagnostics.some((x) => x.code === 'floating-node')).toBe(false);
    const hover = (await client.conn.sendRequest('textDocument/hover', { textDocument: { uri }, position: { line: 4, character: 6 } })) as { contents: { value: string } };
    expect(hover.contents.value).toMatch(/clk=1 \| held by its keeper/);
    // the keeper's strength against the pull-down, never a weak one's ratio rounded to 0.00
    expect(hover.contents.value).toMatch(/; (0\.\d*[1-9]\d*|[1-9][\d.]*)x the pull-down/);
    fs.writeFileSync(path.join(dir, 'dom-fixed.sp'), edited);
  });

  // reference: ngspice (eecircuit-engine) at 110 C on the same cards. The inserted keeper must
  // hold the precharged node through the 0.5 us evaluate phase when the stack is off, and stay
  // weak enough that the stack still pulls the node down when it conducts.
  it('ngspice: the inserted keeper holds the node and still lets evaluation win', async () => {
    const fixed = fs.readFileSync(path.join(dir, 'dom-fixed.sp'), 'utf8');
    const sim = async (deck: string, a: 0 | 1, b: 0 | 1) => {
      const inline = deck.replace('.include models.inc', MODELS).replace(/^vclk .*$/m, 'vclk clk 0 PWL(0 0 1n 0 1.02n 1)').replace(/^\.control[\s\S]*?^\.endc\s*$/m, '').replace(/^\.end\s*$/m, '');
      const r = await runNgspice(`${inline}\nva a 0 ${a}\nvb b 0 ${b}\n.options gmin=1e-18\n.temp 110\n.tran 1n 501n\n.end\n`);
      const t = r.get('time')!;
      const v = r.get('v(xg.dyn)') ?? r.get('xg.dyn')!;
      return { t, v };
    };
    const after = (w: { t: number[]; v: number[] }, s: number) => w.v[w.t.findIndex((x) => x >= s)]!;
    const bare = await sim(DECK, 0, 1);
    const held = await sim(fixed, 0, 1);
    const evaluate = await sim(fixed, 1, 1);
    // without the keeper the node leaks past the 0.1 V budget within the phase; with it, it holds
    expect(after(bare, 501e-9)).toBeLessThan(0.9);
    expect(Math.min(...held.v.filter((_, i) => held.t[i]! > 2e-9))).toBeGreaterThan(0.9);
    // evaluation still wins over the keeper: the node falls below 0.1 V within 5 ns
    expect(after(evaluate, 6e-9)).toBeLessThan(0.1);
  });

  it('gives an outline, definitions, folding and completion', async () => {
    fs.writeFileSync(path.join(dir, 'nav.sp'), DECK);
    const uri = pathToFileURL(path.join(dir, 'nav.sp')).toString();
    const opened = client.diagnosticsFor(uri);
    await client.open(uri, DECK);
    await opened;
    const symbols = (await client.conn.sendRequest('textDocument/documentSymbol', { textDocument: { uri } })) as Array<{ name: string }>;
    expect(symbols.map((s) => s.name)).toContain('dom_and2');
    const def = (await client.conn.sendRequest('textDocument/definition', { textDocument: { uri }, position: { line: 12, character: 26 } })) as Array<{ range: { start: { line: number } } }>;
    expect(def[0]!.range.start.line).toBe(3);
    const model = (await client.conn.sendRequest('textDocument/definition', { textDocument: { uri }, position: { line: 5, character: 18 } })) as Array<{ uri: string }>;
    expect(model[0]!.uri).toMatch(/models\.inc$/);
    const folds = (await client.conn.sendRequest('textDocument/foldingRange', { textDocument: { uri } })) as Array<{ startLine: number; endLine: number }>;
    expect(folds.map((f) => f.startLine)).toEqual(expect.arrayContaining([3]));
    // references and rename of a net within its subcircuit: dyn appears on 5 lines of dom_and2
    const refs = (await client.conn.sendRequest('textDocument/references', { textDocument: { uri }, position: { line: 4, character: 6 }, context: { includeDeclaration: true } })) as unknown[];
    expect(refs.length).toBe(5);
    const rename = (await client.conn.sendRequest('textDocument/rename', { textDocument: { uri }, position: { line: 4, character: 6 }, newName: 'pre_node' })) as { changes: Record<string, Array<{ range: never; newText: string }>> };
    const renamed = applyEdits(DECK, rename.changes[uri]!);
    expect(renamed).not.toMatch(/\bdyn\b/);
    expect(renamed.match(/pre_node/g)!.length).toBe(5);
    const comp = (await client.conn.sendRequest('textDocument/completion', { textDocument: { uri }, position: { line: 2, character: 12 } })) as Array<{ label: string }>;
    expect(comp.map((c) => c.label)).toEqual(expect.arrayContaining(['clock', 'standby', 'accept']));
  });

  it('answers every request through a stream of random edits and stays up', async () => {
    let text = DECK;
    let seed = 7;
    const rand = (n: number) => ((seed = (seed * 1103515245 + 12345) % 2147483648), seed % n);
    const pieces = ['(', ')', '{', '}', '=', ' ', '\n', '+', 'X1 a b ', '.subckt', '.ends', 'M9 q q q q ', '* tidemark: clock', "'"];
    for (let v = 3; v < 40; v++) {
      const at = rand(text.length + 1);
      text = text.slice(0, at) + pieces[rand(pieces.length)] + text.slice(at + rand(4));
      await client.change(uri, text, v);
      const line = rand(text.split('\n').length);
      const r = await client.conn.sendRequest('textDocument/hover', { textDocument: { uri }, position: { line, character: rand(10) } });
      expect(r === null || typeof r === 'object').toBe(true);
      await client.conn.sendRequest('textDocument/codeAction', { textDocument: { uri }, range: { start: { line, character: 0 }, end: { line, character: 1 } }, context: { diagnostics: [] } });
    }
    const symbols = await client.conn.sendRequest('textDocument/documentSymbol', { textDocument: { uri } });
    expect(Array.isArray(symbols)).toBe(true);
    expect(client.proc.exitCode).toBeNull();
  });
});
