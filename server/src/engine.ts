// The engine's front door: text in, findings out, through pure stages. The CLI and the language
// server call only this module. Parse results are cached by (file, content) so an edit re-parses
// only the file that changed.

import type { Diagnostic } from './core/diagnostics';
import type { FileHost } from './core/host';
import type { EngineOptions } from './core/options';
import { loadDeck, type Deck } from './circuit/deck';
import { elaborate } from './circuit/elaborate';
import type { Circuit, Design } from './circuit/circuit';
import { findClocks } from './phases/clocks';
import { buildPhases, type PhasePlan } from './phases/phases';
import { buildSwitchNetwork } from './analysis/switchNetwork';
import { classify, type Classification } from './analysis/classify';
import { classificationFindings } from './findings/classificationFindings';
import { parseNetlist } from './syntax/parser';
import type { SyntaxFile } from './syntax/tree';

export interface CircuitAnalysis {
  circuit: Circuit;
  plan: PhasePlan;
  classification: Classification;
}

export interface AnalysisResult {
  deck: Deck;
  design: Design;
  /** One per circuit of the design, in the same order. */
  circuits: CircuitAnalysis[];
  /** Every finding of every stage, in file order. */
  diagnostics: Diagnostic[];
}

const parseCache = new Map<string, { text: string; result: SyntaxFile }>();
const PARSE_CACHE_LIMIT = 2000;

/** Parses with a cache keyed by path, title mode and exact content. */
export function parseCached(file: string, text: string, hasTitle: boolean): SyntaxFile {
  const key = `${hasTitle ? 'T' : 'I'}:${file}`;
  const hit = parseCache.get(key);
  if (hit && hit.text === text) return hit.result;
  const result = parseNetlist(file, text, { hasTitle });
  if (parseCache.size >= PARSE_CACHE_LIMIT) parseCache.clear();
  parseCache.set(key, { text, result });
  return result;
}

/** Analyses one top-level netlist (and what it includes), read through `host`. */
export function analyse(host: FileHost, file: string, options: EngineOptions = {}): AnalysisResult {
  const roots = [{ file, text: host.readFile(file) ?? '' }];
  const hostWithPaths: FileHost = options.includePaths?.length ? { ...host, includePaths: [...(host.includePaths ?? []), ...options.includePaths] } : host;
  const deck = loadDeck(hostWithPaths, roots, parseCached);
  const { design, diagnostics } = elaborate(deck, options);
  const all = [...deck.diagnostics, ...diagnostics];
  const circuits: CircuitAnalysis[] = [];
  if (options.frontEndOnly !== true) {
    for (const circuit of design.circuits) {
      const clocks = findClocks(circuit, design.directives, options);
      const plan = buildPhases(circuit, clocks.clocks, design.directives, options);
      const network = buildSwitchNetwork(circuit, clocks.clocks);
      const classification = classify(network, plan);
      circuits.push({ circuit, plan, classification });
      all.push(...clocks.diagnostics, ...plan.diagnostics, ...classificationFindings(circuit, classification, options));
    }
  }
  all.sort((a, b) => (a.file < b.file ? -1 : a.file > b.file ? 1 : a.range.start.line - b.range.start.line || a.range.start.character - b.range.start.character));
  return { deck, design, circuits, diagnostics: dedupe(all) };
}

/** Directive notes about nets are raised per circuit; a cell library would repeat them. */
function dedupe(list: Diagnostic[]): Diagnostic[] {
  const seen = new Set<string>();
  return list.filter((d) => {
    const k = `${d.rule}|${d.file}|${d.range.start.line}|${d.range.start.character}|${d.message}`;
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
}
