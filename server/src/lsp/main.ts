// The language server: a thin shell over the engine. It owns no analysis state beyond caches
// keyed by content; every handler is guarded so an exception is logged and answered empty.

import { createConnection, ProposedFeatures, TextDocuments, TextDocumentSyncKind, DiagnosticSeverity, type Diagnostic as LspDiagnostic } from 'vscode-languageserver/node';
import { TextDocument } from 'vscode-languageserver-textdocument';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { analyse } from '../engine';
import { diskHost } from '../cli/diskHost';
import type { FileHost } from '../core/host';
import type { Diagnostic } from '../core/diagnostics';

const connection = createConnection(ProposedFeatures.all);
const documents = new TextDocuments(TextDocument);
const disk = diskHost();

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
    connection.console.error(`tidemark: ${what} failed: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`);
    return fallback;
  }
}

function toLsp(d: Diagnostic): LspDiagnostic {
  return {
    range: { start: d.range.start, end: d.range.end },
    severity: d.severity === 'error' ? DiagnosticSeverity.Error : d.severity === 'warning' ? DiagnosticSeverity.Warning : DiagnosticSeverity.Information,
    code: d.rule,
    source: 'tidemark',
    message: d.message,
  };
}

/** Files that last received diagnostics from each analysed document, so stale ones are cleared. */
const published = new Map<string, Set<string>>();
const timers = new Map<string, NodeJS.Timeout>();

function analyseDocument(uri: string): void {
  guard('analysis', () => {
    if (!uri.startsWith('file:')) return;
    const file = fileURLToPath(uri);
    const result = analyse(host, file);
    const byFile = new Map<string, LspDiagnostic[]>([[file, []]]);
    for (const d of result.diagnostics) {
      const list = byFile.get(d.file) ?? [];
      list.push(toLsp(d));
      byFile.set(d.file, list);
    }
    const before = published.get(uri) ?? new Set();
    for (const f of before) if (!byFile.has(f)) connection.sendDiagnostics({ uri: pathToFileURL(f).toString(), diagnostics: [] });
    for (const [f, list] of byFile) connection.sendDiagnostics({ uri: pathToFileURL(f).toString(), diagnostics: list });
    published.set(uri, new Set(byFile.keys()));
  }, undefined);
}

function schedule(uri: string): void {
  clearTimeout(timers.get(uri));
  // a short pause lets a burst of keystrokes settle into one analysis
  timers.set(uri, setTimeout(() => analyseDocument(uri), 120));
}

connection.onInitialize(() => ({
  capabilities: { textDocumentSync: TextDocumentSyncKind.Incremental },
  serverInfo: { name: 'tidemark', version: '0.1.0' },
}));

documents.onDidOpen((e) => analyseDocument(e.document.uri));
documents.onDidChangeContent((e) => schedule(e.document.uri));
documents.onDidClose((e) => {
  clearTimeout(timers.get(e.document.uri));
  for (const f of published.get(e.document.uri) ?? []) connection.sendDiagnostics({ uri: pathToFileURL(f).toString(), diagnostics: [] });
  published.delete(e.document.uri);
});

documents.listen(connection);
connection.listen();
