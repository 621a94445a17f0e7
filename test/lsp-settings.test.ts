// The tidemark.* settings over the real protocol: the server pulls them from a client that has
// configuration (workspace/configuration), analyses with them, and on a change of settings
// publishes what a fresh analysis with the new ones finds. New corners or a new budget alone are
// taken from the last analysis (engine `reanalyseOptions`, logged by the server); any other
// setting analyses afresh.

import * as fs from 'node:fs';
import * as path from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { TestLspClient, type PublishedDiagnostics } from './support/lspClient';
import { analyse } from '../server/src/engine';
import { diskHost } from '../server/src/cli/diskHost';
import type { EngineOptions } from '../server/src/core/options';
import { locate } from '../server/src/service/locate';
import { netHover } from '../server/src/service/hover';

const FILE = path.join(__dirname, '..', 'samples', 'tern_dynamic_latch.sp');
const URI = pathToFileURL(FILE).toString();

const published = (p: PublishedDiagnostics) => p.diagnostics.map((d) => `${d.range.start.line}:${d.range.start.character} ${d.code} ${d.message}`);

/** What the engine finds in the sample with these options, in the shape the server publishes. */
function engineFindings(options: EngineOptions): string[] {
  return analyse(diskHost(), FILE, options)
    .diagnostics.filter((d) => d.file === FILE)
    .map((d) => `${d.range.start.line}:${d.range.start.character} ${d.rule} ${d.message}`);
}

describe('settings over the real protocol', () => {
  let client: TestLspClient;
  let settings: Record<string, unknown> = { temps: [25, 110], budget: '10%' };
  let pulled: () => void;
  const firstPull = new Promise<void>((resolve) => (pulled = resolve));
  beforeAll(async () => {
    client = new TestLspClient();
    await client.initialize(pathToFileURL(path.dirname(FILE)).toString(), () => {
      pulled();
      return settings;
    });
    await firstPull;
  }, 60_000);
  afterAll(async () => {
    await client.shutdown();
  });

  /** New settings sent: the diagnostics the server settles on are a fresh analysis's with `options`. */
  async function settlesAs(next: Record<string, unknown>, options: EngineOptions): Promise<void> {
    const expected = engineFindings(options);
    const answered = client.diagnosticsFor(URI, (p) => published(p).join('\n') === expected.join('\n'));
    settings = next;
    await client.conn.sendNotification('workspace/didChangeConfiguration', { settings: null });
    expect(published(await answered)).toEqual(expected);
  }

  it('the first analysis uses the settings pulled from the client', async () => {
    settings = { temps: [25, 110], budget: '10%' };
    const first = client.diagnosticsFor(URI);
    await client.open(URI, fs.readFileSync(FILE, 'utf8'));
    expect(published(await first)).toEqual(engineFindings({ tempsC: [25, 110], budget: { fraction: 0.1 } }));
  }, 60_000);

  it('a hotter corner and a wider budget: taken from the last analysis, with a fresh analysis findings and hover', async () => {
    const options: EngineOptions = { tempsC: [25, 125], budget: { fraction: 0.15 } };
    // the figures move: the sample's combined-droop finding goes with the wider budget
    expect(engineFindings(options)).not.toEqual(engineFindings({ tempsC: [25, 110], budget: { fraction: 0.1 } }));
    const logged = client.logs.length;
    await settlesAs({ temps: [25, 125], budget: '15%' }, options);
    expect(client.logs.slice(logged).some((m) => m.startsWith('new corner or budget settings: taken from the last analysis'))).toBe(true);
    // the hover card quotes the new corner's figures
    const text = fs.readFileSync(FILE, 'utf8');
    const line = text.split('\n').findIndex((l) => /^Mpass_n\b/i.test(l));
    expect(line).toBeGreaterThan(0);
    const position = { line, character: text.split('\n')[line]!.toLowerCase().indexOf(' st ') + 1 };
    const fresh = analyse(diskHost(), FILE, options);
    const spot = locate(fresh.deck.files.find((x) => x.file === FILE)!, position);
    expect(spot?.kind).toBe('net');
    const hover = (await client.conn.sendRequest('textDocument/hover', { textDocument: { uri: URI }, position })) as { contents: { value: string } } | null;
    expect(hover?.contents.value).toBe(netHover(fresh, FILE, spot as Extract<NonNullable<typeof spot>, { kind: 'net' }>));
    expect(hover?.contents.value).toContain('125');
  }, 60_000);

  it('a budget in volts, then the defaults again: each taken from the last analysis', async () => {
    const logged = client.logs.length;
    await settlesAs({ temps: [25, 125], budget: '80mV' }, { tempsC: [25, 125], budget: { volts: 0.08 } });
    // (an editor sends every setting, with its default where the user set none)
    await settlesAs({ temps: [25, 110], budget: '10%' }, { tempsC: [25, 110], budget: { fraction: 0.1 } });
    expect(client.logs.slice(logged).filter((m) => m.startsWith('new corner or budget settings')).length).toBe(2);
  }, 60_000);

  it('another setting (a supply net) analyses afresh, with a fresh analysis findings', async () => {
    const logged = client.logs.length;
    await settlesAs({ temps: [25, 110], budget: '10%', supplies: { vdd: 0.9 } }, { tempsC: [25, 110], budget: { fraction: 0.1 }, supplies: { vdd: 0.9 } });
    expect(client.logs.slice(logged).some((m) => m.startsWith('new corner or budget settings'))).toBe(false);
    expect(client.proc.exitCode).toBeNull();
  }, 60_000);
});

describe('settings that arrive after a netlist was opened', () => {
  it('the findings settle on the analysis with the pulled settings, not the defaults', async () => {
    const client = new TestLspClient();
    // the client answers the configuration request late, after the document is open and under way
    let answer: (v: unknown) => void = () => undefined;
    const late = new Promise((resolve) => (answer = resolve));
    client.conn.onRequest('workspace/configuration', async (p: { items: unknown[] }) => {
      await late;
      return p.items.map(() => ({ temps: [25, 125], budget: '80mV' }));
    });
    await client.conn.sendRequest('initialize', { processId: process.pid, rootUri: pathToFileURL(path.dirname(FILE)).toString(), capabilities: { workspace: { configuration: true } }, workspaceFolders: null });
    await client.conn.sendNotification('initialized', {});
    const expected = engineFindings({ tempsC: [25, 125], budget: { volts: 0.08 } });
    expect(expected).not.toEqual(engineFindings({}));
    const settled = client.diagnosticsFor(URI, (p) => published(p).join('\n') === expected.join('\n'));
    const first = client.diagnosticsFor(URI);
    await client.open(URI, fs.readFileSync(FILE, 'utf8'));
    await first;
    answer(undefined);
    expect(published(await settled)).toEqual(expected);
    await client.shutdown();
  }, 60_000);
});

describe('a setting the analysis cannot use', () => {
  it('is named in a warning and left at its default; the rest are taken and the findings come', async () => {
    const client = new TestLspClient();
    const shown: Array<{ type: number; message: string }> = [];
    client.conn.onNotification('window/showMessage', (p: { type: number; message: string }) => {
      shown.push(p);
    });
    let pulled: () => void = () => undefined;
    const firstPull = new Promise<void>((resolve) => (pulled = resolve));
    await client.initialize(pathToFileURL(path.dirname(FILE)).toString(), () => {
      pulled();
      return { temps: '25,110', budget: '15%', clocks: 'clk' };
    });
    await firstPull;
    const expected = engineFindings({ tempsC: [25, 110], budget: { fraction: 0.15 } });
    const settled = client.diagnosticsFor(URI, (p) => published(p).join('\n') === expected.join('\n'));
    await client.open(URI, fs.readFileSync(FILE, 'utf8'));
    expect(published(await settled)).toEqual(expected);
    expect(shown.length).toBe(1);
    expect(shown[0]!.type).toBe(2);
    expect(shown[0]!.message).toMatch(/tidemark\.temps is "25,110"/);
    expect(shown[0]!.message).toMatch(/tidemark\.clocks is "clk"/);
    expect(client.proc.exitCode).toBeNull();
    await client.shutdown();
  }, 60_000);
});
