// The VS Code side: starts the bundled language server, forwards the tidemark.* settings, and
// adds two commands and a status-bar summary. All analysis lives in the server; this is the only
// folder that imports 'vscode'.

import * as path from 'node:path';
import * as vscode from 'vscode';
import { LanguageClient, TransportKind, type LanguageClientOptions, type ServerOptions } from 'vscode-languageclient/node';

let client: LanguageClient | undefined;

interface Summary {
  errors: number;
  warnings: number;
  floatingNodePhases: number;
}

export async function activate(context: vscode.ExtensionContext): Promise<void> {
  const module = context.asAbsolutePath(path.join('dist', 'server.js'));
  const serverOptions: ServerOptions = {
    run: { module, transport: TransportKind.ipc },
    debug: { module, transport: TransportKind.ipc, options: { execArgv: ['--nolazy', '--inspect=6009'] } },
  };
  const clientOptions: LanguageClientOptions = {
    documentSelector: [{ scheme: 'file', language: 'spice' }],
    synchronize: {
      configurationSection: 'tidemark',
      fileEvents: vscode.workspace.createFileSystemWatcher('**/*.{sp,spi,spice,cir,ckt,net,cdl,inc,lib,mod}'),
    },
  };
  client = new LanguageClient('tidemark', 'Tidemark', serverOptions, clientOptions);
  await client.start();

  const status = vscode.window.createStatusBarItem(vscode.StatusBarAlignment.Left, 50);
  status.command = 'tidemark.showPhases';
  context.subscriptions.push(status);
  const refresh = async () => {
    const editor = vscode.window.activeTextEditor;
    if (!client || !editor || editor.document.languageId !== 'spice') {
      status.hide();
      return;
    }
    const s = (await client.sendRequest('tidemark/summary', { uri: editor.document.uri.toString() })) as Summary | null;
    if (!s) return status.hide();
    status.text = `$(pulse) Tidemark: ${s.floatingNodePhases} floating · ${s.errors}E ${s.warnings}W`;
    status.tooltip = 'Tidemark: node-phase pairs that can float, and findings in this netlist (click for the phase table). Estimates are a screening aid, not sign-off.';
    status.show();
  };
  context.subscriptions.push(
    vscode.window.onDidChangeActiveTextEditor(() => void refresh()),
    vscode.languages.onDidChangeDiagnostics(() => void refresh()),
    vscode.commands.registerCommand('tidemark.reanalyse', async () => {
      await client?.sendRequest('workspace/executeCommand', { command: 'tidemark.reanalyse', arguments: [] });
    }),
    vscode.commands.registerCommand('tidemark.showPhases', async () => {
      const editor = vscode.window.activeTextEditor;
      if (!client || !editor) return;
      const phases = (await client.sendRequest('tidemark/phases', { uri: editor.document.uri.toString() })) as Array<{ circuit: string; name: string; start_s: number | null; duration_s: number | null; standby: boolean }>;
      const fmt = (x: number | null) => (x === null ? '—' : `${(x * 1e9).toPrecision(4)} ns`);
      await vscode.window.showQuickPick(
        phases.map((p) => ({ label: p.name, description: `${p.standby ? 'standby' : `from ${fmt(p.start_s)}`}, lasts ${fmt(p.duration_s)}`, detail: p.circuit })),
        { title: 'Tidemark: clock phases of this netlist', canPickMany: false },
      );
    }),
  );
  void refresh();
}

export async function deactivate(): Promise<void> {
  await client?.stop();
}
