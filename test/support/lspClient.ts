// A minimal LSP client over stdio for tests: starts the real bundled server (dist/server.js).

import { spawn, type ChildProcess } from 'node:child_process';
import * as path from 'node:path';
import { createMessageConnection, StreamMessageReader, StreamMessageWriter, type MessageConnection } from 'vscode-jsonrpc/node';

export interface PublishedDiagnostics {
  uri: string;
  diagnostics: Array<{ range: { start: { line: number; character: number } }; severity: number; code: string; message: string }>;
}

export class TestLspClient {
  readonly proc: ChildProcess;
  readonly conn: MessageConnection;
  private readonly waiters: Array<{ match: (p: PublishedDiagnostics) => boolean; resolve: (p: PublishedDiagnostics) => void }> = [];
  readonly published: PublishedDiagnostics[] = [];
  /** The server's log messages (window/logMessage), in order. */
  readonly logs: string[] = [];

  constructor() {
    const server = path.join(__dirname, '../../dist/server.js');
    this.proc = spawn(process.execPath, [server, '--stdio'], { stdio: ['pipe', 'pipe', 'pipe'] });
    this.conn = createMessageConnection(new StreamMessageReader(this.proc.stdout!), new StreamMessageWriter(this.proc.stdin!));
    this.conn.onNotification('textDocument/publishDiagnostics', (p: PublishedDiagnostics) => {
      this.published.push(p);
      for (let i = this.waiters.length - 1; i >= 0; i--) {
        if (this.waiters[i]!.match(p)) {
          this.waiters[i]!.resolve(p);
          this.waiters.splice(i, 1);
        }
      }
    });
    this.conn.onNotification('window/logMessage', (p: { message: string }) => {
      this.logs.push(p.message);
    });
    this.conn.listen();
  }

  /** `settings`: the `tidemark` section the client answers the server's configuration requests with (none: the client has no configuration). */
  async initialize(rootUri: string, settings?: () => Record<string, unknown>): Promise<unknown> {
    if (settings) this.conn.onRequest('workspace/configuration', (p: { items: Array<{ section?: string }> }) => p.items.map((i) => (i.section === 'tidemark' ? settings() : null)));
    const capabilities = settings ? { workspace: { configuration: true, didChangeConfiguration: { dynamicRegistration: false } } } : {};
    const r = await this.conn.sendRequest('initialize', { processId: process.pid, rootUri, capabilities, workspaceFolders: null });
    await this.conn.sendNotification('initialized', {});
    return r;
  }

  /** Resolves with the next diagnostics published for `uri` that satisfy `match`. */
  diagnosticsFor(uri: string, match: (p: PublishedDiagnostics) => boolean = () => true): Promise<PublishedDiagnostics> {
    return new Promise((resolve) => this.waiters.push({ match: (p) => p.uri === uri && match(p), resolve }));
  }

  open(uri: string, text: string, version = 1): Promise<void> {
    return this.conn.sendNotification('textDocument/didOpen', { textDocument: { uri, languageId: 'spice', version, text } });
  }

  change(uri: string, text: string, version: number): Promise<void> {
    return this.conn.sendNotification('textDocument/didChange', { textDocument: { uri, version }, contentChanges: [{ text }] });
  }

  async shutdown(): Promise<void> {
    await this.conn.sendRequest('shutdown');
    await this.conn.sendNotification('exit');
    this.conn.dispose();
    this.proc.kill();
  }
}

/** Applies LSP text edits (sorted from the end) to a text. */
export function applyEdits(text: string, edits: Array<{ range: { start: { line: number; character: number }; end: { line: number; character: number } }; newText: string }>): string {
  const lines = text.split('\n');
  const offset = (p: { line: number; character: number }) => lines.slice(0, p.line).reduce((s, l) => s + l.length + 1, 0) + p.character;
  const sorted = [...edits].sort((a, b) => offset(b.range.start) - offset(a.range.start));
  let out = text;
  for (const e of sorted) out = out.slice(0, offset(e.range.start)) + e.newText + out.slice(offset(e.range.end));
  return out;
}
