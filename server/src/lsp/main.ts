// The language server: a thin shell over the engine and the service layer. It keeps only
// caches keyed by content (analysis results per document version) and the include graph; every
// handler is guarded, so an exception is logged and answered empty and the server stays up.

import {
  createConnection,
  ProposedFeatures,
  TextDocuments,
  TextDocumentSyncKind,
  DiagnosticSeverity,
  CodeActionKind,
  SymbolKind,
  CompletionItemKind,
  MarkupKind,
  type Diagnostic as LspDiagnostic,
  type DocumentSymbol,
  type CodeAction,
  type Connection,
  type WorkDoneProgressServerReporter,
  ShowMessageNotification,
  MessageType,
} from 'vscode-languageserver/node';
import { TextDocument } from 'vscode-languageserver-textdocument';
import { fileURLToPath, pathToFileURL } from 'node:url';
import * as path from 'node:path';
import { analyseDesignSteps, analyseSteps, readDeck, reanalyse, reanalyseOptions, reelaborate, type AnalysisResult, type Elaborated } from '../engine';
import { performance } from 'node:perf_hooks';
import { carryOver } from '../service/carryOver';
import type { Deck } from '../circuit/deck';
import { diskHost } from '../cli/diskHost';
import type { FileHost } from '../core/host';
import type { Diagnostic } from '../core/diagnostics';
import type { EngineOptions } from '../core/options';
import { locate } from '../service/locate';
import { deviceHover, netHover } from '../service/hover';
import { quickFixes } from '../service/fixes';
import { completions, definitionOf, foldingRanges, netReferences, outline, type OutlineSymbol } from '../service/outline';
import { DEFAULT_SETTINGS, engineOptionsFor, readSettings, type Settings } from './settings';
import * as v8 from 'node:v8';

// Full analyses allocate fast, and the JavaScript engine then lets the heap grow to several times
// what stays alive before it collects: over the benchmark's back-to-back full analyses of the
// 100k netlist the server reached 1.7-1.9 GB resident for about 150 MB alive. Growing by at most
// the live size between collections keeps it at about 0.73 GB on the benchmark's heavy rows
// (1.17-1.24 GB without), at the same speed within the noise (both servers, back to back).
v8.setFlagsFromString('--heap-growing-percent=100');

const connection: Connection = createConnection(ProposedFeatures.all);
const documents = new TextDocuments(TextDocument);
const disk = diskHost();

let settings: Settings = DEFAULT_SETTINGS;
/** The last warning about settings not taken, so it is shown once per change. */
let settingsWarning = '';
let canPullConfiguration = false;

/** Open documents first (their unsaved text), then the disk. */
const host: FileHost = {
  readFile(p) {
    const doc = documents.get(pathToFileURL(p).toString());
    return doc ? doc.getText() : disk.readFile(p);
  },
  resolve: disk.resolve,
};

function guard<T>(what: string, fn: () => T, fallback: T): T {
  try {
    return fn();
  } catch (e) {
    logFailure(what, e);
    return fallback;
  }
}

async function guardAsync<T>(what: string, fn: () => Promise<T>, fallback: T): Promise<T> {
  try {
    return await fn();
  } catch (e) {
    logFailure(what, e);
    return fallback;
  }
}

function logFailure(what: string, e: unknown): void {
  connection.console.error(`tidemark: ${what} failed: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`);
}

// the last guard: a promise nobody awaited that fails is logged, and the server stays up (Node
// would end the process)
process.on('unhandledRejection', (e) => logFailure('a background task', e));

function engineOptions(lineCount: number, from: Settings = settings): EngineOptions {
  return engineOptionsFor(from, lineCount);
}

const RULES_DOC = pathToFileURL(path.join(__dirname, '..', 'docs', 'rules.md')).toString();

function toLsp(d: Diagnostic): LspDiagnostic {
  const out: LspDiagnostic = {
    range: { start: d.range.start, end: d.range.end },
    severity: d.severity === 'error' ? DiagnosticSeverity.Error : d.severity === 'warning' ? DiagnosticSeverity.Warning : DiagnosticSeverity.Information,
    code: d.rule,
    codeDescription: { href: `${RULES_DOC}#${d.rule}` },
    source: 'tidemark',
    message: d.message,
  };
  if (d.related?.length) out.relatedInformation = d.related.map((r) => ({ location: { uri: pathToFileURL(r.file).toString(), range: { start: r.range.start, end: r.range.end } }, message: r.message }));
  if (d.node) out.data = { node: d.node, rule: d.rule };
  if (d.accepted) {
    // reviewed: a faint hint that still says what it is and why it was accepted
    out.severity = DiagnosticSeverity.Hint;
    out.message = `accepted: "${d.accepted.reason}". ${d.message}`;
    out.relatedInformation = [...(out.relatedInformation ?? []), { location: { uri: pathToFileURL(d.accepted.file).toString(), range: { start: d.accepted.range.start, end: d.accepted.range.end } }, message: 'the accept directive' }];
  }
  return out;
}

interface Cached {
  /** The texts the result was computed from (root and includes; undefined: file missing). */
  texts: Map<string, string | undefined>;
  result: AnalysisResult;
}

const results = new Map<string, Cached>();
const published = new Map<string, Set<string>>();
const timers = new Map<string, NodeJS.Timeout>();
/** Bumped by every change that concerns a root; a run for an older generation is abandoned. */
const generation = new Map<string, number>();
const runs = new Map<string, { gen: number; promise: Promise<Cached | undefined> }>();

/** Wait after a keystroke before re-analysing: a burst of typing gives one analysis. */
const EDIT_DEBOUNCE_MS = 40;
/**
 * Quick answers build on each other (each keeps what it did not redo from the one before), so
 * after a few in a row a full analysis runs once the document has been still this long: it
 * stands in for the chain, which keeps the next quick answers' lookups short. It takes about
 * 2.5 s on 100k transistors, so it waits for a real pause: started after 0.8 s, most runs were
 * cut short by the next keystroke, whose answer then also paid for the run's garbage (measured:
 * a device line added a second after the last edit took a median of 160-170 ms, 120-130 ms
 * with no run under way).
 */
const QUICK_CHAIN_LIMIT = 4;
const COMPACT_IDLE_MS = 2000;
const quickInARow = new Map<string, number>();
/** Longest stretch the analysis holds the thread before letting protocol messages in. */
const SLICE_MS = 8;
/**
 * An edit's design built from the last analysis's (engine `reelaborate`) when the quick answer
 * declined it, for the full analysis of that generation to start from: it skips the elaboration.
 */
const elaboratedFor = new Map<string, { gen: number; texts: Map<string, string | undefined>; elaborated: Elaborated }>();

function fresh(c: Cached): boolean {
  for (const [f, t] of c.texts) if (host.readFile(f) !== t) return false;
  return true;
}

const genOf = (uri: string) => generation.get(uri) ?? 0;

/**
 * The analysis of a root document's current texts: the cached one, the run already under way
 * for them, or a new run. Runs go in slices (engine `analyseSteps`), so requests and edits are
 * served between slices; a run whose document changed meanwhile stops and answers undefined.
 */
function analysisOf(uri: string): Promise<Cached | undefined> {
  if (!uri.startsWith('file:')) return Promise.resolve(undefined);
  const hit = results.get(uri);
  if (hit && fresh(hit)) return Promise.resolve(hit);
  const gen = genOf(uri);
  const running = runs.get(uri);
  if (running && running.gen === gen) return running.promise;
  const promise = runAnalysis(uri, gen).finally(() => {
    if (runs.get(uri)?.promise === promise) runs.delete(uri);
  });
  runs.set(uri, { gen, promise });
  return promise;
}

/** A full analysis the editor waits for that runs longer than this shows the editor's progress indicator. */
const PROGRESS_AFTER_MS = 300;

/** The editor's progress indicator for a long analysis (none if the client has no work-done progress). */
async function analysingProgress(file: string): Promise<WorkDoneProgressServerReporter | undefined> {
  try {
    const progress = await connection.window.createWorkDoneProgress();
    progress.begin('Tidemark', undefined, `analysing ${path.basename(file)}`, false);
    return progress;
  } catch {
    return undefined;
  }
}

async function runAnalysis(uri: string, gen: number, compacting = false): Promise<Cached | undefined> {
  const startedAt = performance.now();
  let progress: Promise<WorkDoneProgressServerReporter | undefined> | undefined;
  try {
    return await runAnalysisSlices(uri, gen, compacting, () => {
      // the idle-time compaction runs unseen: nobody waits for it
      if (!compacting && !progress && performance.now() - startedAt > PROGRESS_AFTER_MS) progress = analysingProgress(fileURLToPath(uri));
    });
  } finally {
    if (progress) void progress.then((p) => p?.done());
  }
}

/** The run itself; `betweenSlices` is called at every pause. */
async function runAnalysisSlices(uri: string, gen: number, compacting: boolean, betweenSlices: () => void): Promise<Cached | undefined> {
  const file = fileURLToPath(uri);
  // every text the run reads, as it read it (all reads happen in its first slice)
  const noted = notingHost();
  let texts = noted.texts;
  const lines = countLines(host.readFile(file) ?? '');
  const built = elaboratedFor.get(uri);
  if (built && built.gen <= gen) elaboratedFor.delete(uri);
  const fromDesign = built && built.gen === gen && [...built.texts].every(([f, t]) => host.readFile(f) === t);
  if (fromDesign) texts = built.texts;
  const steps = fromDesign ? analyseDesignSteps(built.elaborated, engineOptions(lines)) : analyseSteps(noted.noting, file, engineOptions(lines));
  let sliceStart = performance.now();
  for (;;) {
    const r = steps.next();
    if (r.done) {
      const result = r.value;
      if (lines > settings.maxAnalysisLines) {
        result.diagnostics.push({ rule: 'unknown-card', severity: 'info', file, range: { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } }, message: `this file has ${lines} lines, over tidemark.maxAnalysisLines (${settings.maxAnalysisLines}): only the front end runs` });
      }
      const c = { texts, result };
      if (genOf(uri) === gen) {
        results.set(uri, c);
        quickInARow.set(uri, 0);
      }
      return c;
    }
    if (performance.now() - sliceStart < SLICE_MS) continue;
    betweenSlices();
    await new Promise<void>((resolve) => setImmediate(resolve));
    sliceStart = performance.now();
    if (genOf(uri) !== gen) {
      steps.return(undefined as never);
      return undefined;
    }
    // a quick answer for these texts arrived meanwhile: it stands for this run (a compaction,
    // which replaces the quick chain, keeps going)
    const cached = results.get(uri);
    if (!compacting && cached && fresh(cached)) {
      steps.return(undefined as never);
      return cached;
    }
  }
}

/** The host, noting each text read, so a result knows the texts it came from. */
function notingHost(): { texts: Map<string, string | undefined>; noting: FileHost } {
  const texts = new Map<string, string | undefined>();
  const noting: FileHost = {
    ...host,
    readFile(p) {
      const t = host.readFile(p);
      if (!texts.has(p)) texts.set(p, t);
      return t;
    },
  };
  return { texts, noting };
}

function countLines(text: string): number {
  let n = 1;
  for (let i = text.indexOf('\n'); i >= 0; i = text.indexOf('\n', i + 1)) n++;
  return n;
}

/**
 * For requests that need the analysis (hover, quick fixes, lenses): the analysis of the
 * current text, waiting for the run under way if there is one. Gives up (undefined) only when
 * the document keeps changing under it.
 */
async function currentAnalysis(uri: string): Promise<Cached | undefined> {
  // a request right behind an edit: the edit's quick answer first (it waits two turns of the
  // event loop), so the request reads it rather than starting a full analysis
  if (uri.startsWith('file:')) tryQuickAnswer(rootFor(uri), true);
  for (let attempt = 0; attempt < 50; attempt++) {
    const c = await analysisOf(uri);
    if (c && fresh(c)) return c;
    if (!uri.startsWith('file:')) return undefined;
  }
  return undefined;
}

/** What was last sent per root, to skip sending the same diagnostics twice. */
const sentFrom = new Map<string, Diagnostic[]>();

function send(uri: string, diagnostics: Diagnostic[]): void {
  const file = fileURLToPath(uri);
  const byFile = new Map<string, LspDiagnostic[]>([[file, []]]);
  for (const d of diagnostics) {
    const list = byFile.get(d.file) ?? [];
    list.push(toLsp(d));
    byFile.set(d.file, list);
  }
  const before = published.get(uri) ?? new Set();
  for (const f of before) if (!byFile.has(f)) connection.sendDiagnostics({ uri: pathToFileURL(f).toString(), diagnostics: [] });
  for (const [f, list] of byFile) connection.sendDiagnostics({ uri: pathToFileURL(f).toString(), diagnostics: list });
  published.set(uri, new Set(byFile.keys()));
  sentFrom.set(uri, diagnostics);
  // a file this netlist includes that was open as a netlist of its own (opened first) is
  // covered from now on: what it published for other files is withdrawn
  for (const f of new Set([...byFile.keys(), ...(results.get(uri)?.texts.keys() ?? [])])) {
    const other = pathToFileURL(f).toString();
    if (other === uri || !published.has(other)) continue;
    for (const g of published.get(other)!) if (!byFile.has(g) && !published.get(uri)!.has(g)) connection.sendDiagnostics({ uri: pathToFileURL(g).toString(), diagnostics: [] });
    published.delete(other);
    sentFrom.delete(other);
  }
}


/**
 * The netlist whose analysis covers a document: another open netlist that includes it (its
 * findings and hovers come from there, in the context it is used in), else the document itself.
 */
function rootFor(uri: string): string {
  if (!uri.startsWith('file:')) return uri;
  const file = fileURLToPath(uri);
  for (const [root, c] of results) if (root !== uri && c.texts.has(file) && documents.get(root)) return root;
  return uri;
}

async function publish(uri: string): Promise<void> {
  // an included file's findings are published by the netlist that includes it
  if (rootFor(uri) !== uri) return;
  // findings carried over for this text are out: its analysis moves with them later, none runs now
  if (pendingMoves.get(uri)?.gen === genOf(uri)) return;
  const gen = genOf(uri);
  const c = await guardAsync('analysis', () => analysisOf(uri), undefined);
  // a newer edit publishes its own
  if (!c || genOf(uri) !== gen || rootFor(uri) !== uri) return;
  if (sentFrom.get(uri) === c.result.diagnostics) return;
  guard('publish', () => send(uri, c.result.diagnostics), undefined);
}

/**
 * An edit. Some kinds are answered at once, from the last analysis: one that changed no meaning
 * (comments, blank lines) moves the findings to their new lines, and a size edit, a rename or a
 * reconnection redoes only what it reaches (engine `reanalyse`, exact).
 * Otherwise a full analysis runs after the debounce, in slices, and the next edit cancels it.
 */
function schedule(uri: string, delayMs = EDIT_DEBOUNCE_MS): void {
  clearTimeout(timers.get(uri));
  const gen = genOf(uri) + 1;
  generation.set(uri, gen);
  // after the messages already received: the protocol library takes one message per turn of
  // the event loop, so two turns let a request sent right behind the edit (an outline) go first
  const quick = () => {
    if (genOf(uri) === gen) tryQuickAnswer(uri, false);
  };
  if (delayMs > 0) setImmediate(() => setImmediate(quick));
  timers.set(
    uri,
    setTimeout(() => {
      if (genOf(uri) !== gen) return;
      // a request that read a long file may have held the thread past the debounce: the quick
      // answer still goes first, so no full analysis starts that it would have made needless
      if (delayMs > 0) quick();
      void publish(uri);
    }, delayMs),
  );
}

/** The generation each document's quick answer was tried for (once per edit). */
const quickTried = new Map<string, number>();

/**
 * The current edit's quick answer, if not tried yet. `now`: an analysis moved with findings
 * carried over is worked out at once (a request waits for it), not left pending.
 */
function tryQuickAnswer(uri: string, now: boolean): void {
  const gen = genOf(uri);
  if (quickTried.get(uri) !== gen) {
    quickTried.set(uri, gen);
    guard('quick re-analysis', () => quickAnswer(uri), undefined);
  }
  if (now) applyPendingMove(uri);
}

/**
 * After findings carried over an edit that changed no meaning: the analysis moved with them
 * (engine `reanalyse`), worked out when a request needs it, before an edit that changes meaning
 * is answered, or once the document has been still for MOVE_IDLE_MS; so keystrokes in a
 * comment do not wait for it (on a flat 100k-line netlist a line put in moves every later
 * device: 130-250 ms). A later such edit replaces it (moved from the same cached analysis).
 * Its `apply` stands only while the analysis it moves is still the cached one.
 */
const pendingMoves = new Map<string, { gen: number; apply: () => void }>();
const MOVE_IDLE_MS = 300;

/** Works out the pending moved analysis; one for an older text only when `older` (an edit is answered from it next), else it is dropped. */
function applyPendingMove(uri: string, older = false): void {
  const p = pendingMoves.get(uri);
  if (!p) return;
  pendingMoves.delete(uri);
  if (older || p.gen === genOf(uri)) guard('quick re-analysis', p.apply, undefined);
}

function quickAnswer(uri: string): void {
  if (rootFor(uri) !== uri) return;
  let last = results.get(uri);
  if (!last || fresh(last)) {
    // (a pending move was for another text)
    pendingMoves.delete(uri);
    return;
  }
  // a file over the size limit gets only the front end, with a note quoting its line count: the
  // quick answers are for analysed files on both sides of the edit
  const file = fileURLToPath(uri);
  const lines = countLines(host.readFile(file) ?? '');
  if (lines > settings.maxAnalysisLines || last.result.circuits.length !== last.result.design.circuits.length) return;
  // the parse of the new text serves both quick answers
  const { texts, deck } = parsed(uri);
  // (after edits that changed no meaning the cached analysis is of an older text: the carry-over
  // reads from it across them all)
  const moved = carryOver(last.result, deck);
  if (!moved) {
    // a change of meaning: the moved analysis first, then this edit from it
    if (pendingMoves.has(uri)) {
      applyPendingMove(uri, true);
      last = results.get(uri)!;
      if (fresh(last)) return;
    }
    fromPrevious(uri, last, texts, deck, lines);
    return;
  }
  // findings moved to their new lines go out at once; the analysis moved with them follows
  send(uri, moved);
  const gen = genOf(uri);
  const from = last;
  pendingMoves.set(uri, {
    gen,
    apply: () => {
      if (results.get(uri) === from) fromPrevious(uri, from, texts, deck, lines, moved);
    },
  });
  setTimeout(() => {
    if (genOf(uri) === gen) applyPendingMove(uri);
  }, MOVE_IDLE_MS);
}

/** The analysis of an edit from the last one (engine `reanalyse`); `moved`: the findings already sent for it. */
function fromPrevious(uri: string, last: Cached, texts: Map<string, string | undefined>, deck: Deck, lines: number, moved?: Diagnostic[]): void {
  const result = reanalyse(last.result, deck, engineOptions(lines));
  if (!result) {
    if (moved) return;
    // too much to patch: the design is still built from the last one, for the full analysis
    const elaborated = reelaborate(last.result, deck, engineOptions(lines));
    if (elaborated) elaboratedFor.set(uri, { gen: genOf(uri), texts, elaborated });
    return;
  }
  results.set(uri, { texts, result });
  if (!moved || JSON.stringify(moved) !== JSON.stringify(result.diagnostics)) send(uri, result.diagnostics);
  else sentFrom.set(uri, result.diagnostics);
  const chain = (quickInARow.get(uri) ?? 0) + 1;
  quickInARow.set(uri, chain);
  if (chain >= QUICK_CHAIN_LIMIT) {
    const gen = genOf(uri);
    setTimeout(() => {
      if (genOf(uri) !== gen) return;
      // in slices, abandoned by the next edit; its findings are the quick answer's (the tests
      // hold them equal), and are sent only if they are not
      void guardAsync(
        'compaction',
        () =>
          runAnalysis(uri, gen, true).then((c) => {
            const sent = sentFrom.get(uri);
            if (c && genOf(uri) === gen && sent && JSON.stringify(sent) !== JSON.stringify(c.result.diagnostics)) {
              connection.console.warn('a quick answer differed from the full analysis; the full one is published');
              send(uri, c.result.diagnostics);
            }
          }),
        undefined,
      );
    }, COMPACT_IDLE_MS);
  }
}

/** Roots whose analysis read `file`: they are re-analysed when it changes. */
function dependents(file: string): string[] {
  const out: string[] = [];
  for (const [uri, c] of results) if (c.texts.has(file) && fileURLToPath(uri) !== file) out.push(uri);
  return out;
}

connection.onInitialize((params) => {
  canPullConfiguration = params.capabilities.workspace?.configuration === true;
  return {
    capabilities: {
      textDocumentSync: TextDocumentSyncKind.Incremental,
      hoverProvider: true,
      codeActionProvider: { codeActionKinds: [CodeActionKind.QuickFix] },
      documentSymbolProvider: true,
      definitionProvider: true,
      referencesProvider: true,
      renameProvider: { prepareProvider: true },
      foldingRangeProvider: true,
      completionProvider: { triggerCharacters: [':', ' '] },
      codeLensProvider: { resolveProvider: false },
      executeCommandProvider: { commands: ['tidemark.reanalyse'] },
    },
    serverInfo: { name: 'tidemark', version: '0.1.0' },
  };
});

async function pullSettings(): Promise<void> {
  if (!canPullConfiguration) return;
  const raw: unknown = await connection.workspace.getConfiguration('tidemark');
  const { settings: read, problems } = readSettings(raw);
  settings = read;
  // a value not taken is named once (each change of them), and the analysis goes on without it
  const warning = problems.join('; ');
  if (warning && warning !== settingsWarning) {
    connection.console.warn(`settings: ${warning}`);
    // a notification, not a request: there is nothing to answer, and no client can fail it
    void connection.sendNotification(ShowMessageNotification.type, { type: MessageType.Warning, message: `Tidemark settings: ${warning}` });
  }
  settingsWarning = warning;
}

/**
 * The settings pulled from the client, at start and on every change. When they differ from the
 * ones the open netlists were analysed with (at start, a document may already be under way
 * with the defaults), new corners or a new budget alone are taken from each netlist's last
 * analysis; anything else analyses every open document afresh.
 */
async function takeSettings(): Promise<void> {
  const was = settings;
  await guardAsync('settings', () => pullSettings(), undefined);
  if (JSON.stringify(was) === JSON.stringify(settings)) return;
  if (guard('settings', () => answerNewSettings(was), false)) return;
  results.clear();
  decks.clear();
  for (const d of documents.all()) schedule(d.uri, 0);
}

connection.onInitialized(() => void takeSettings());
connection.onDidChangeConfiguration(() => takeSettings());

/**
 * New corner or budget settings (`was`: the settings before): each open netlist's last analysis
 * takes them (engine `reanalyseOptions`: the classification stands, the estimates are redone),
 * and the findings are published at once; settings that give the same options change nothing. False,
 * with nothing changed, when a netlist has no current analysis or another setting changed:
 * everything is then analysed afresh.
 */
function answerNewSettings(was: Settings): boolean {
  // the size limit is quoted in the note of a file over it
  if (was.maxAnalysisLines !== settings.maxAnalysisLines) return false;
  const answers: Array<[string, Cached]> = [];
  for (const d of documents.all()) {
    if (rootFor(d.uri) !== d.uri) continue;
    const last = results.get(d.uri);
    if (!last || !fresh(last)) return false;
    const lines = countLines(d.getText());
    const before = engineOptions(lines, was);
    const after = engineOptions(lines);
    // the same options written another way (10% and 10.0%): nothing to do
    if (JSON.stringify(before) === JSON.stringify(after)) continue;
    const result = reanalyseOptions(last.result, before, after);
    if (!result) return false;
    answers.push([d.uri, { texts: last.texts, result }]);
  }
  if (answers.length === 0) return true;
  connection.console.log(`new corner or budget settings: taken from the last analysis of ${answers.length} open netlist(s)`);
  for (const [uri, cached] of answers) {
    // an analysis under way, or due, read the old settings
    clearTimeout(timers.get(uri));
    generation.set(uri, genOf(uri) + 1);
    results.set(uri, cached);
    send(uri, cached.result.diagnostics);
  }
  return true;
}

documents.onDidOpen((e) => void publish(e.document.uri));
documents.onDidChangeContent((e) => {
  schedule(e.document.uri);
  if (e.document.uri.startsWith('file:')) for (const dep of dependents(fileURLToPath(e.document.uri))) schedule(dep);
});
documents.onDidClose((e) => {
  clearTimeout(timers.get(e.document.uri));
  // an analysis under way for it is dropped at its next slice
  generation.set(e.document.uri, genOf(e.document.uri) + 1);
  sentFrom.delete(e.document.uri);
  for (const f of published.get(e.document.uri) ?? []) connection.sendDiagnostics({ uri: pathToFileURL(f).toString(), diagnostics: [] });
  published.delete(e.document.uri);
  const closed = results.get(e.document.uri);
  results.delete(e.document.uri);
  decks.delete(e.document.uri);
  // open files it included lost their findings with it: their own analysis, or another netlist
  // that includes them, publishes them again
  if (closed)
    for (const d of documents.all()) {
      if (d.uri === e.document.uri || !d.uri.startsWith('file:') || !closed.texts.has(fileURLToPath(d.uri))) continue;
      const root = rootFor(d.uri);
      sentFrom.delete(root);
      schedule(root, 0);
    }
});
connection.onDidChangeWatchedFiles((e) => {
  for (const ch of e.changes) if (ch.uri.startsWith('file:')) for (const dep of dependents(fileURLToPath(ch.uri))) schedule(dep);
});

function syntaxOf(c: Cached, file: string) {
  return c.result.deck.files.find((f) => f.file === file);
}

const decks = new Map<string, { texts: Map<string, string | undefined>; deck: Deck }>();

/**
 * The parsed netlist alone, for requests that need no analysis (outline, folding, definitions,
 * references, rename, completion): they answer from the current text at once instead of waiting
 * for the re-analysis an edit has scheduled.
 */
function deckFor(uri: string): Deck | undefined {
  if (!uri.startsWith('file:')) return undefined;
  const full = results.get(uri);
  if (full && fresh(full)) return full.result.deck;
  return parsed(uri).deck;
}

/** The parsed netlist of the current texts, with the texts it read (cached until one changes). */
function parsed(uri: string): { texts: Map<string, string | undefined>; deck: Deck } {
  const hit = decks.get(uri);
  if (hit && [...hit.texts].every(([f, t]) => host.readFile(f) === t)) return hit;
  const { texts, noting } = notingHost();
  const entry = { texts, deck: readDeck(noting, fileURLToPath(uri), engineOptions(0)) };
  decks.set(uri, entry);
  return entry;
}

function fileOf(deck: Deck | undefined, file: string) {
  return deck?.files.find((f) => f.file === file);
}

connection.onHover((p) =>
  guardAsync('hover', async () => {
    const c = await currentAnalysis(rootFor(p.textDocument.uri));
    if (!c) return null;
    const file = fileURLToPath(p.textDocument.uri);
    const f = syntaxOf(c, file);
    if (!f) return null;
    const t = locate(f, p.position);
    if (!t) return null;
    let md: string | undefined;
    if (t.kind === 'net') md = netHover(c.result, file, t);
    else if (t.kind === 'device') md = deviceHover(c.result, file, t);
    else if (t.kind === 'subckt' || t.kind === 'model') {
      const defs = definitionOf(c.result.deck, t.kind, t.name);
      md = `**${t.name}** — ${t.kind === 'subckt' ? 'subcircuit' : 'model'}${defs.length ? ` defined in ${path.basename(defs[0]!.file)}:${defs[0]!.range.start.line + 1}` : ' (not defined in this netlist)'}`;
    }
    return md ? { contents: { kind: MarkupKind.Markdown, value: md }, range: t.word.range } : null;
  }, null),
);

connection.onCodeAction((p) =>
  guardAsync('code actions', async () => {
    const c = await currentAnalysis(rootFor(p.textDocument.uri));
    if (!c) return [];
    const file = fileURLToPath(p.textDocument.uri);
    // one action per fix: the same fix offered for two findings on the line (a holder for a float
    // and for its short retention) is listed once, with both findings
    const actions = new Map<string, CodeAction>();
    for (const ld of p.context.diagnostics) {
      // two findings of one rule can share a place (a keeper too weak for the leakage, and for charge sharing): the message tells them apart
      const here = c.result.diagnostics.filter((x) => x.file === file && x.rule === ld.code && x.range.start.line === ld.range.start.line && x.range.start.character === ld.range.start.character);
      const d = here.find((x) => x.message === ld.message) ?? here[0];
      if (!d) continue;
      for (const fx of quickFixes(c.result, d)) {
        const changes: Record<string, Array<{ range: { start: { line: number; character: number }; end: { line: number; character: number } }; newText: string }>> = {};
        for (const e of fx.edits) (changes[pathToFileURL(e.file).toString()] ??= []).push({ range: { start: e.range.start, end: e.range.end }, newText: e.newText });
        const key = `${fx.title}\n${JSON.stringify(changes)}`;
        const known = actions.get(key);
        if (known) known.diagnostics!.push(ld);
        else actions.set(key, { title: fx.title, kind: CodeActionKind.QuickFix, diagnostics: [ld], edit: { changes }, isPreferred: fx.preferred === true });
      }
    }
    return [...actions.values()];
  }, []),
);

function toSymbol(s: OutlineSymbol): DocumentSymbol {
  return {
    name: s.name,
    kind: s.kind === 'subckt' ? SymbolKind.Class : s.kind === 'model' ? SymbolKind.Struct : SymbolKind.Constant,
    range: { start: s.range.start, end: s.range.end },
    selectionRange: { start: s.selection.start, end: s.selection.end },
    children: s.children.map(toSymbol),
  };
}

connection.onDocumentSymbol((p) =>
  guard('symbols', () => {
    const f = fileOf(deckFor(p.textDocument.uri), fileURLToPath(p.textDocument.uri));
    return f ? outline(f).map(toSymbol) : [];
  }, []),
);

connection.onFoldingRanges((p) =>
  guard('folding', () => {
    const file = fileURLToPath(p.textDocument.uri);
    const f = fileOf(deckFor(p.textDocument.uri), file);
    return f ? foldingRanges(f, host.readFile(file) ?? '') : [];
  }, []),
);

connection.onDefinition((p) =>
  guard('definition', () => {
    const deck = deckFor(p.textDocument.uri);
    if (!deck) return [];
    const f = fileOf(deck, fileURLToPath(p.textDocument.uri));
    const t = f && locate(f, p.position);
    if (!t || (t.kind !== 'subckt' && t.kind !== 'model' && t.kind !== 'param')) return [];
    return definitionOf(deck, t.kind, t.name).map((d) => ({ uri: pathToFileURL(d.file).toString(), range: { start: d.range.start, end: d.range.end } }));
  }, []),
);

function netAt(uri: string, position: { line: number; character: number }) {
  const file = fileURLToPath(uri);
  const f = fileOf(deckFor(uri), file);
  const t = f && locate(f, position);
  return t && t.kind === 'net' && f ? { f, t } : undefined;
}

connection.onReferences((p) =>
  guard('references', () => {
    const hit = netAt(p.textDocument.uri, p.position);
    if (!hit) return [];
    return netReferences(hit.f, hit.t.subckt, hit.t.name).map((r) => ({ uri: p.textDocument.uri, range: { start: r.start, end: r.end } }));
  }, []),
);

connection.onPrepareRename((p) =>
  guard('rename', () => {
    const hit = netAt(p.textDocument.uri, p.position);
    if (!hit || hit.t.name === '0') return null;
    return { range: { start: hit.t.word.range.start, end: hit.t.word.range.end }, placeholder: hit.t.word.text };
  }, null),
);

connection.onRenameRequest((p) =>
  guard('rename', () => {
    const hit = netAt(p.textDocument.uri, p.position);
    // a net name is one word: no spaces, '=' or brackets, and not the ground node
    if (!hit || !/^[^\s=(),{}'";]+$/.test(p.newName) || hit.t.name === '0') return null;
    const edits = netReferences(hit.f, hit.t.subckt, hit.t.name).map((r) => ({ range: { start: r.start, end: r.end }, newText: p.newName }));
    return { changes: { [p.textDocument.uri]: edits } };
  }, null),
);

connection.onCompletion((p) =>
  guard('completion', () => {
    const deck = deckFor(p.textDocument.uri);
    const doc = documents.get(p.textDocument.uri);
    if (!deck || !doc) return [];
    const prefix = doc.getText({ start: { line: p.position.line, character: 0 }, end: p.position });
    return completions(deck, prefix).map((x) => ({ label: x.label, detail: x.detail, kind: x.kind === 'directive' ? CompletionItemKind.Keyword : x.kind === 'subckt' ? CompletionItemKind.Class : CompletionItemKind.Struct }));
  }, []),
);

connection.onCodeLens((p) =>
  guardAsync('code lens', async () => {
    const c = await currentAnalysis(rootFor(p.textDocument.uri));
    if (!c) return [];
    const file = fileURLToPath(p.textDocument.uri);
    const f = syntaxOf(c, file);
    if (!f) return [];
    const lenses = [];
    for (const sym of outline(f)) {
      if (sym.kind !== 'subckt') continue;
      const name = sym.name.toLowerCase();
      const here = c.result.diagnostics.filter((d) => !d.accepted && d.file === file && d.range.start.line >= sym.range.start.line && d.range.start.line <= sym.range.end.line);
      const errors = here.filter((d) => d.severity === 'error').length;
      const warnings = here.filter((d) => d.severity === 'warning').length;
      let floating = 0;
      for (const a of c.result.circuits) a.circuit.nets.forEach((n, id) => n.origin.subckt === name && a.classification.perPhase.some((m) => m.get(id)?.state === 'floating' || m.get(id)?.state === 'conditional') && floating++);
      lenses.push({ range: { start: sym.selection.start, end: sym.selection.end }, command: { title: `${floating} node${floating === 1 ? '' : 's'} can float · ${errors} error${errors === 1 ? '' : 's'}, ${warnings} warning${warnings === 1 ? '' : 's'}`, command: '' } });
    }
    return lenses;
  }, []),
);

connection.onExecuteCommand((p) =>
  guard('command', () => {
    if (p.command === 'tidemark.reanalyse') {
      results.clear();
      for (const d of documents.all()) schedule(d.uri, 0);
    }
    return null;
  }, null),
);

/** The phase table of a document, for the client's "show phases" command. */
connection.onRequest('tidemark/phases', (p: { uri: string }) =>
  guardAsync('phases', async () => {
    const c = await currentAnalysis(rootFor(p.uri));
    if (!c) return [];
    return c.result.circuits.flatMap((a) => a.plan.phases.map((ph) => ({ circuit: a.circuit.name, name: ph.name, start_s: ph.startS, duration_s: ph.durationS, standby: ph.standby })));
  }, []),
);

/** Counts for the client's status bar. */
connection.onRequest('tidemark/summary', (p: { uri: string }) =>
  guardAsync('summary', async () => {
    const c = await currentAnalysis(rootFor(p.uri));
    if (!c) return null;
    const d = c.result.diagnostics.filter((x) => !x.accepted);
    let floating = 0;
    for (const a of c.result.circuits) for (const m of a.classification.perPhase) for (const r of m.values()) if (r.state === 'floating' || r.state === 'conditional') floating++;
    return { errors: d.filter((x) => x.severity === 'error').length, warnings: d.filter((x) => x.severity === 'warning').length, floatingNodePhases: floating };
  }, null),
);

documents.listen(connection);
connection.listen();
