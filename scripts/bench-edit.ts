// Edit latency in the editor: the real bundled server (dist/server.js) over stdio, the
// 100k-transistor hierarchical netlist open, one line edited (several kinds of edit, each ten
// times, undone in between); prints the time from the change notification until the new
// diagnostics are published, and the median per kind. Figures only, no assertions.

import { spawn } from 'node:child_process';
import * as fs from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { performance } from 'node:perf_hooks';
import { pathToFileURL } from 'node:url';
import { createMessageConnection, StreamMessageReader, StreamMessageWriter } from 'vscode-jsonrpc/node';
import { flatNetlist, hierarchicalNetlist } from './netlists';

/**
 * What, which line, its change, when the undo is worth a figure of its own what the undo is,
 * and how long the editor is left still before each edit (none: the edits follow each other).
 */
type Edit = [string, (l: string) => boolean, (l: string) => string, string?, number?];

const RECONNECTION: Edit = ['a reconnection (a block input moved to another net)', (l) => l.startsWith('Xb7 '), (l) => l.replace('Xb7 a7 ', 'Xb7 a9 ')];

async function main(): Promise<void> {
  const big = await measure(100_000, [
    ['a rename (a block output renamed on its instance line)', (l) => l.startsWith('Xb7 '), (l) => l.replace(' y7 ', ' y7x ')],
    ['a width in a leaf cell', (l) => l.startsWith('Mn1 y a n1'), (l) => l.replace('w=0.4u', 'w=0.42u')],
    ['the keeper length in the domino cell', (l) => l.startsWith('Mkp dyn out'), (l) => l.replace('l=0.1u', 'l=0.12u')],
    ['the keeper swapped to the low-threshold flavour', (l) => l.startsWith('Mkp dyn out'), (l) => l.replace(' bp ', ' bpl ')],
    ['a comment line', (l) => l.startsWith('vdd '), (l) => `* supply\n${l}`],
    // a change of connectivity, rewired in the previous analysis
    RECONNECTION,
    // a name typed that no net has yet: the previous analysis under the new net numbers, then rewired
    ['a block input moved to a new net (a new name at the top level)', (l) => l.startsWith('Xb7 '), (l) => l.replace('Xb7 a7 ', 'Xb7 a7n '), 'the old name put back (the new net goes again)'],
    ['a slice input moved to a new net in the block cell (105 copies)', (l) => l.startsWith('Xs3 '), (l) => l.replace('Xs3 w2 ', 'Xs3 w2n ')],
    // new devices: spliced into the previous analysis, up to a limit on the copies
    ['a device added at the top level', (l) => l.startsWith('Xb7 '), (l) => `${l}\nMx y7 clk vdd vdd bp w=0.2u l=0.1u`, 'the device at the top level deleted'],
    // the server's idle-time analysis starts after 2 s still (it replaces the chain of quick
    // answers): an edit 2.3 s after the last one arrives while it runs and waits for its step
    ['a device added at the top level while the idle-time analysis runs', (l) => l.startsWith('Xb7 '), (l) => `${l}\nMx y7 clk vdd vdd bp w=0.2u l=0.1u`, undefined, 2300],
    ['a device added in the block cell (105 copies)', (l) => l.startsWith('Xs3 '), (l) => `${l}\nMx w3 clk vdd vdd bp w=0.2u l=0.1u`, 'the device in the block cell deleted (105 copies)'],
    ['a device added on a new node in the block cell (105 copies)', (l) => l.startsWith('Xs3 '), (l) => `${l}\nMx w3 clk w3mid vdd bp w=0.2u l=0.1u`],
    // a line being typed: its states that add nothing yet (too few nodes) are answered from the
    // previous analysis with the line's own finding, even in the cell with 4,200 copies
    ['a transistor line half typed in the domino cell (too few nodes yet; 4,200 copies)', (l) => l.startsWith('Mkp dyn out'), (l) => `${l}\nMx dyn clk`, 'the half-typed line taken out'],
    ['a transistor line half typed at the top level (too few nodes yet)', (l) => l.startsWith('Xb7 '), (l) => `${l}\nMx y7 clk`],
    ['a block instance half typed at the top level (its cell name not complete yet)', (l) => l.startsWith('Xb7 '), (l) => `${l}\nXnew a7 a8 a9 a10 clk clkb y7 vdd 0 b_bl`],
    // a reviewed finding: an accept directive put in (the quick fix), every later line moved
    ['an accept directive put in (a finding marked reviewed)', (l) => l.startsWith('Xb7 '), (l) => `* tidemark: accept y7 floating-node reason="reviewed"\n${l}`, 'the accept directive taken out'],
    // values on cards: a model card put in place of the old one, a .param by elaborating afresh;
    // the phases and classification kept
    ['a parameter every latch pass gate reads (.param lpass, 8,400 devices)', (l) => l.startsWith('.param lpass='), (l) => l.replace('0.05u', '0.06u')],
    ['the pass gate length written as an expression in the latch cell (6,300 copies)', (l) => l.startsWith('Mtn d clk st'), (l) => l.replace('l=lpass', 'l={lpass*1.2}')],
    ['a value on the low-threshold p-channel .model card (no device uses it)', (l) => l.startsWith('.model bpl '), (l) => l.replace('kp=90u', 'kp=95u')],
    ['a value on the p-channel .model card (every p-channel device)', (l) => l.startsWith('.model bp '), (l) => l.replace('kp=80u', 'kp=85u')],
    // what every estimate reads: the phases and classification kept, every node estimated again
    // (one solve per family of twins)
    ['the supply at 1.1 V (every estimate redone)', (l) => l.startsWith('vdd vdd 0 '), (l) => l.replace(' 1.0', ' 1.1')],
    ['a droop budget line put in (every estimate redone, every later line moved)', (l) => l.startsWith('vdd vdd 0 '), (l) => `* tidemark: budget 8%\n${l}`, 'the budget line taken out again'],
    // a device in a cell with 4,200 copies: over the splice's limit, the full analysis runs (on
    // the design built from the previous one)
    ['a device added to the domino cell (full analysis, elaboration skipped)', (l) => l.startsWith('Mkp dyn out'), (l) => `${l}\nMx dyn clk vdd vdd bp w=0.1u l=0.1u`],
    // a clock at another period: clk and clkb (two sources) now overlap, new clock values, so
    // new phases: the later stages run on the design built from the previous one, with its
    // switch network and its results for the clock values it had (the two new ones are checked)
    ['clkb at another period (new phases: later stages, network and two of four sets of clock values kept)', (l) => l.startsWith('vclkb '), (l) => l.replace('0.5n 1n)', '0.7n 1.5n)'), 'clkb back at its period (two of the four sets of clock values run: answered from the previous analysis)'],
  ], false, true);
  // the same on a netlist of the size most blocks have
  const small = await measure(10_000, [RECONNECTION]);
  // a flat extracted netlist of 100k lines: the parse of the new text reads again only the
  // chunk of lines the edit is in (when the line count stays), then the quick answers as above
  const flat = await measure(100_000, [
    ['a width in the flat netlist', (l) => l.startsWith('MN50000 '), (l) => l.replace('w=0.3u', 'w=0.32u')],
    ['a comment line in the flat netlist', (l) => l.startsWith('MN50000 '), (l) => `* stage 25000\n${l}`],
  ], true);
  console.log('edit latency, change notification to published diagnostics (comment, size, rename, reconnection, added or deleted device, card value, supply, clock timing, budget and corner edits are answered from the previous analysis; others run the full analysis after a 40 ms debounce):');
  for (const line of [...big, ...small, ...flat]) console.log('  ' + line);
}

/** Opens a generated netlist of about `transistors` in the server, times each kind of edit. */
async function measure(transistors: number, all: Edit[], flat = false, settingsRow = false): Promise<string[]> {
  // TIDEMARK_BENCH_ONLY=pattern: only the edits whose description matches it (a regular expression; for a quick look at some)
  const only = process.env.TIDEMARK_BENCH_ONLY;
  const edits = only ? all.filter(([what]) => new RegExp(only).test(what)) : all;
  if (edits.length === 0 && !settingsRow) return [];
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-edit-'));
  const file = path.join(dir, 'datapath.sp');
  let text = flat ? flatNetlist(transistors) : hierarchicalNetlist(transistors);
  const size = flat ? `${transistors.toLocaleString('en-US')} transistors, flat` : `${(Math.ceil(transistors / 48 / 20) * 20 * 48).toLocaleString('en-US')} transistors`;
  fs.writeFileSync(file, text);
  const uri = pathToFileURL(file).toString();
  // TIDEMARK_BENCH_SERVER_ARGS: Node flags for the server (e.g. --cpu-prof --cpu-prof-dir=/tmp/prof)
  const serverArgs = (process.env.TIDEMARK_BENCH_SERVER_ARGS ?? '').split(' ').filter(Boolean);
  const proc = spawn(process.execPath, ['--max-old-space-size=4096', ...serverArgs, path.join(__dirname, '..', 'dist', 'server.js'), '--stdio'], { stdio: ['pipe', 'pipe', 'inherit'] });
  const conn = createMessageConnection(new StreamMessageReader(proc.stdout!), new StreamMessageWriter(proc.stdin!));
  let waiting: ((n: number) => void) | undefined;
  conn.onNotification('textDocument/publishDiagnostics', (p: { uri: string; diagnostics: unknown[] }) => {
    if (p.uri === uri && waiting) waiting(p.diagnostics.length);
  });
  // the editor's tidemark settings (none set, then corners set for the settings row)
  let settings: unknown = null;
  conn.onRequest('workspace/configuration', (p: { items: unknown[] }) => p.items.map(() => settings));
  conn.onRequest('client/registerCapability', () => null);
  conn.listen();
  await conn.sendRequest('initialize', { processId: process.pid, rootUri: pathToFileURL(dir).toString(), capabilities: { workspace: { configuration: true } } });
  conn.sendNotification('initialized', {});
  const published = () => new Promise<number>((resolve) => (waiting = resolve));
  let t = performance.now();
  let next = published();
  conn.sendNotification('textDocument/didOpen', { textDocument: { uri, languageId: 'spice', version: 1, text } });
  let count = await next;
  console.log(`open      ${(performance.now() - t).toFixed(0).padStart(6)} ms  ${count} diagnostics (first analysis, ${size})`);
  const lines = text.split('\n');
  let version = 2;
  const ROUNDS = 10;
  const summary: string[] = [];
  const line = (what: string, times: number[]) => {
    const sorted = [...times].sort((a, b) => a - b);
    // the first edits of a kind run code the JavaScript engine has not compiled yet
    return `${what}, ${size}: first ${times[0]!.toFixed(0)} ms, median ${sorted[sorted.length >> 1]!.toFixed(0)} ms, fastest ${sorted[0]!.toFixed(0)} ms, slowest ${sorted[sorted.length - 1]!.toFixed(0)} ms over ${ROUNDS} edits`;
  };
  for (const [what, find, change, undoWhat, pauseMs] of edits) {
    const times: number[] = [];
    const undoTimes: number[] = [];
    for (let round = 0; round < ROUNDS; round++) {
      if (pauseMs) await new Promise((r) => setTimeout(r, pauseMs));
      const i = lines.findIndex(find);
      const original = lines[i]!;
      const changed = change(original);
      lines[i] = changed;
      text = lines.join('\n');
      t = performance.now();
      next = published();
      // the one line replaced, as an editor sends a change
      const lineRange = (len: number) => ({ start: { line: i, character: 0 }, end: { line: i, character: len } });
      conn.sendNotification('textDocument/didChange', { textDocument: { uri, version: version++ }, contentChanges: [{ range: lineRange(original.length), text: changed }] });
      // a request that needs only the parse is answered before the re-analysis
      const symbols = (await conn.sendRequest('textDocument/documentSymbol', { textDocument: { uri } })) as unknown[];
      const outlineMs = performance.now() - t;
      count = await next;
      const ms = performance.now() - t;
      lines[i] = original;
      text = lines.join('\n');
      next = published();
      const undoStart = performance.now();
      // the undo: the edited lines (one or two) replaced by the original line
      const added = changed.split('\n');
      conn.sendNotification('textDocument/didChange', { textDocument: { uri, version: version++ }, contentChanges: [{ range: { start: { line: i, character: 0 }, end: { line: i + added.length - 1, character: added[added.length - 1]!.length } }, text: original }] });
      await next;
      undoTimes.push(performance.now() - undoStart);
      times.push(ms);
      console.log(`edit      ${ms.toFixed(0).padStart(6)} ms to new diagnostics (${count}); outline ${outlineMs.toFixed(0)} ms (${symbols.length} symbols) | ${what}, round ${round + 1} (${size})`);
    }
    summary.push(line(what, times));
    if (undoWhat) summary.push(line(undoWhat, undoTimes));
  }
  // a change of settings: other temperature corners, then the first ones again (every estimate redone)
  const corners = 'new temperature corners in the settings (every estimate redone)';
  if (settingsRow && (!only || new RegExp(only).test(corners))) {
    const times: number[] = [];
    for (let round = 0; round < ROUNDS; round++) {
      settings = { temps: round % 2 === 0 ? [25, 125] : [25, 110], budget: '10%' };
      t = performance.now();
      next = published();
      conn.sendNotification('workspace/didChangeConfiguration', { settings: null });
      count = await next;
      times.push(performance.now() - t);
      console.log(`settings  ${times[times.length - 1]!.toFixed(0).padStart(6)} ms to new diagnostics (${count}) | ${corners}, round ${round + 1} (${size})`);
    }
    summary.push(line(corners, times));
  }
  // a request right after an edit that changed no meaning: the analysis moves with the findings
  const hover = 'a hover on the domino node right after a comment line put in above it';
  if (settingsRow && (!only || new RegExp(only).test(hover))) {
    const times: number[] = [];
    for (let round = 0; round < ROUNDS; round++) {
      const i = lines.findIndex((l) => l.startsWith('Mpre dyn'));
      next = published();
      t = performance.now();
      conn.sendNotification('textDocument/didChange', { textDocument: { uri, version: version++ }, contentChanges: [{ range: { start: { line: i, character: 0 }, end: { line: i, character: 0 } }, text: `* precharge ${round}\n` }] });
      await conn.sendRequest('textDocument/hover', { textDocument: { uri }, position: { line: i + 1, character: 6 } });
      times.push(performance.now() - t);
      console.log(`hover     ${times[times.length - 1]!.toFixed(0).padStart(6)} ms | ${hover}, round ${round + 1} (${size})`);
      await next;
      next = published();
      conn.sendNotification('textDocument/didChange', { textDocument: { uri, version: version++ }, contentChanges: [{ range: { start: { line: i, character: 0 }, end: { line: i + 1, character: 0 } }, text: '' }] });
      await next;
    }
    summary.push(line(hover, times));
  }
  // the server's peak resident memory (Linux), young generation and all
  const peak = peakResidentMB(proc.pid);
  if (peak !== undefined) console.log(`memory    server peak resident ${peak} MB (${size})`);
  await conn.sendRequest('shutdown');
  conn.sendNotification('exit');
  fs.rmSync(dir, { recursive: true, force: true });
  return summary;
}

/** VmHWM of a live process from /proc, in MB; undefined where there is no /proc. */
function peakResidentMB(pid: number | undefined): number | undefined {
  try {
    const m = /VmHWM:\s+(\d+) kB/.exec(fs.readFileSync(`/proc/${pid}/status`, 'utf8'));
    return m ? Math.round(Number(m[1]) / 1024) : undefined;
  } catch {
    return undefined;
  }
}

void main();
