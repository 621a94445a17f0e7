// `npm run test:e2e`: the extension in a real VS Code. Packages the .vsix, installs it into
// code-server (a VS Code build from the npm registry, tools cached by scripts/e2e/setup.sh outside
// the clone), and drives it with playwright-core in Debian's Chromium: open a sample, see the
// squiggle and the problem count, read the hover card's figures, apply the keeper quick fix from
// the light bulb, and see the finding go away. A screenshot of each step goes to test-results/.

import { execFileSync, spawn } from 'node:child_process';
import * as fs from 'node:fs';
import * as net from 'node:net';
import * as os from 'node:os';
import * as path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const RESULTS = path.join(ROOT, 'test-results');
const SAMPLE = 'tern_domino_adder.sp';
// the precharged node of the AND gate (line 21): a floating-node finding with a sized keeper fix
const NODE_LINE = 21;
const FLOAT_TEXT = 'xp0.dyn floats';

/** Puts the cursor at line:column through Go to Line, and waits until the status bar says so. */
async function goTo(page, line, column) {
  await page.keyboard.press('Control+G');
  const input = page.locator('.quick-input-widget input').filter({ visible: true }).first();
  await input.waitFor();
  // Go to Line is quick input with a ":" prefix; without it the text would be a file search
  await input.fill(`:${line}:${column}`);
  await page.keyboard.press('Enter');
  await page.locator('[id="status.editor.selection"]', { hasText: `Ln ${line}, Col ${column}` }).first().waitFor();
}

function step(msg) {
  console.log(`e2e: ${msg}`);
}

function freePort() {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address();
      s.close(() => resolve(port));
    });
    s.on('error', reject);
  });
}

async function waitForHealth(url, ms) {
  const until = Date.now() + ms;
  while (Date.now() < until) {
    try {
      const r = await fetch(url);
      if (r.ok) return;
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`code-server did not answer ${url} within ${ms} ms`);
}

async function main() {
  fs.mkdirSync(RESULTS, { recursive: true });
  step('tools');
  const tools = execFileSync('bash', [path.join(ROOT, 'scripts', 'e2e', 'setup.sh')], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'inherit'] }).trim().split('\n').at(-1);
  const node24 = path.join(tools, 'node24', 'node_modules', 'node', 'bin');
  const codeServer = path.join(tools, 'code-server', 'node_modules', '.bin', 'code-server');
  step('package the .vsix');
  execFileSync('npm', ['run', 'package', '--silent'], { cwd: ROOT, stdio: 'inherit' });

  // everything the run writes lives in one throw-away folder; the samples are copied, not edited
  const run = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-e2e-'));
  const userData = path.join(run, 'user');
  const extensions = path.join(run, 'extensions');
  const workspace = path.join(run, 'workspace');
  fs.cpSync(path.join(ROOT, 'samples'), workspace, { recursive: true });
  fs.mkdirSync(path.join(userData, 'User'), { recursive: true });
  fs.writeFileSync(
    path.join(userData, 'User', 'settings.json'),
    JSON.stringify({ 'telemetry.telemetryLevel': 'off', 'workbench.startupEditor': 'none', 'editor.hover.delay': 100, 'workbench.tips.enabled': false, 'extensions.autoUpdate': false, 'security.workspace.trust.enabled': false }),
  );
  const env = {
    ...process.env,
    PATH: `${node24}:${process.env.PATH}`,
    EXTENSIONS_GALLERY: '{}',
    XDG_CONFIG_HOME: path.join(run, 'xdg-config'),
    XDG_DATA_HOME: path.join(run, 'xdg-data'),
    XDG_CACHE_HOME: path.join(run, 'xdg-cache'),
    TMPDIR: path.join(run, 'tmp'),
  };
  for (const d of [env.XDG_CONFIG_HOME, env.XDG_DATA_HOME, env.XDG_CACHE_HOME, env.TMPDIR]) fs.mkdirSync(d, { recursive: true });
  step('install the extension');
  execFileSync(codeServer, ['--install-extension', path.join(ROOT, 'tidemark.vsix'), '--force', '--user-data-dir', userData, '--extensions-dir', extensions], { env, stdio: 'inherit' });

  const port = await freePort();
  step(`start code-server on 127.0.0.1:${port}`);
  const server = spawn(
    codeServer,
    ['--bind-addr', `127.0.0.1:${port}`, '--auth', 'none', '--disable-telemetry', '--disable-update-check', '--disable-workspace-trust', '--disable-getting-started-override', '--ignore-last-opened', '--reconnection-grace-time', '5', '--user-data-dir', userData, '--extensions-dir', extensions, workspace],
    { env, stdio: ['ignore', 'pipe', 'pipe'], detached: true },
  );
  // one log for both streams: neither may end it (the other can still write after its own end),
  // so it is closed once code-server has exited; a logging error never fails the run
  const serverLog = fs.createWriteStream(path.join(RESULTS, 'e2e-code-server.log'));
  serverLog.on('error', (e) => console.error(`e2e: code-server log: ${e.message}`));
  server.stdout.pipe(serverLog, { end: false });
  server.stderr.pipe(serverLog, { end: false });
  const exited = new Promise((resolve) => server.once('close', resolve));
  let context;
  try {
    await waitForHealth(`http://127.0.0.1:${port}/healthz`, 60_000);
    context = await chromium.launchPersistentContext(path.join(run, 'chromium'), {
      executablePath: '/usr/bin/chromium',
      headless: true,
      viewport: { width: 1400, height: 900 },
      args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    await context.route('**/*', (route) => (new URL(route.request().url()).hostname === '127.0.0.1' ? route.continue() : route.abort()));
    const page = context.pages()[0] ?? (await context.newPage());
    page.setDefaultTimeout(60_000);
    await page.goto(`http://127.0.0.1:${port}/?folder=${encodeURIComponent(workspace)}`);

    step(`open ${SAMPLE}`);
    await page.getByRole('treeitem', { name: SAMPLE }).click();
    await page.locator('.monaco-editor .squiggly-warning, .monaco-editor .squiggly-error').first().waitFor();
    await page.screenshot({ path: path.join(RESULTS, 'e2e-1-squiggles.png') });

    step('problem count');
    const problems = page.locator('[id="status.problems"] [aria-label]').first();
    await page.waitForFunction(() => /[1-9]/.test(document.querySelector('[id="status.problems"] [aria-label]')?.getAttribute('aria-label') ?? ''));
    const before = await problems.getAttribute('aria-label');
    step(`  status bar: ${before}`);
    await page.keyboard.press('Control+Shift+M');
    const row = page.locator('.markers-panel .monaco-list-row', { hasText: FLOAT_TEXT });
    await row.first().waitFor();
    await page.screenshot({ path: path.join(RESULTS, 'e2e-2-problems.png') });

    step('hover card');
    const editor = page.locator('.monaco-editor').first();
    await editor.click();
    const hover = page.locator('.monaco-hover:not(.hidden)').first();
    // a hover shown before the server's card arrived stays without it (seen once in a busy CI
    // run): shown again, up to three times, and each retry is printed so a pattern would show
    for (let attempt = 1; ; attempt++) {
      await goTo(page, NODE_LINE, 6);
      await page.keyboard.press('Control+K');
      await page.keyboard.press('Control+I');
      try {
        await page.waitForFunction(() => [...document.querySelectorAll('.monaco-hover:not(.hidden)')].some((h) => !/Loading/.test(h.textContent ?? '') && /Capacitance/.test(h.textContent ?? '')), undefined, { timeout: 15_000 });
        break;
      } catch (e) {
        if (attempt === 3) throw e;
        step(`  no card in the hover after 15 s (attempt ${attempt}); showing it again`);
        await page.keyboard.press('Escape');
      }
    }
    const card = await hover.textContent();
    for (const want of [/xp0\.dyn/, /Capacitance\s*[\d.]+\s*[afp]F/, /\d+ C/, /budget/, /not sign-off/]) if (!want.test(card)) throw new Error(`hover card lacks ${want}: ${card}`);
    step(`  hover: ${card.slice(0, 160).replace(/\s+/g, ' ')}...`);
    await page.screenshot({ path: path.join(RESULTS, 'e2e-3-hover.png') });
    await page.keyboard.press('Escape');

    step('keeper quick fix from the light bulb');
    // back to the node's name with the editor focused: the light bulb shows for the cursor
    await page.keyboard.press('Escape');
    await page.locator('.view-line', { hasText: 'Mna dyn a n1' }).first().click();
    await goTo(page, NODE_LINE, 6);
    // the light bulb in the gutter beside the line (its icon name varies with the build)
    const bulb = page.locator('.monaco-editor [class*="codicon-gutter-lightbulb"], .monaco-editor .lightBulbWidget .codicon').filter({ visible: true }).first();
    const keeper = page.locator('.action-widget .monaco-list-row', { hasText: 'Insert a keeper' }).first();
    // a hover card left over the line can swallow the click (seen once in a few dozen runs): the
    // mouse leaves the text first, and the bulb is clicked again if its menu did not open
    for (let attempt = 1; ; attempt++) {
      await page.mouse.move(0, 0);
      await bulb.waitFor();
      await bulb.click();
      const opened = await keeper.waitFor({ timeout: 15_000 }).then(() => true, () => false);
      if (opened) break;
      if (attempt === 3) throw new Error('the light bulb menu did not open with the keeper fix');
      await page.keyboard.press('Escape');
    }
    await page.screenshot({ path: path.join(RESULTS, 'e2e-4-lightbulb.png') });
    await keeper.click();
    await page.locator('.view-line', { hasText: 'Mkeep_dyn' }).first().waitFor();
    // the floating-node finding of the node goes away (the keeper may now be reported as too weak
    // for the node's charge sharing, which is a different finding)
    await row.first().waitFor({ state: 'detached' });
    await page.locator('.markers-panel .monaco-list-row', { hasText: 'xp0.dyn' }).first().waitFor();
    const after = await problems.getAttribute('aria-label');
    step(`  status bar after the fix: ${after}`);
    await page.screenshot({ path: path.join(RESULTS, 'e2e-5-fixed.png') });
    step('passed');
  } catch (e) {
    const page = context?.pages()[0];
    if (page) {
      await page.screenshot({ path: path.join(RESULTS, 'e2e-failure.png') }).catch(() => {});
      const hoverText = await page.locator('.monaco-hover').allTextContents().catch(() => []);
      console.error(`e2e: hovers on screen: ${JSON.stringify(hoverText).slice(0, 300)}`);
      const bulbs = await page.locator('[class*="bulb"]').evaluateAll((els) => els.map((e) => `${e.tagName}.${e.className} visible=${e.getBoundingClientRect().width > 0}`)).catch(() => []);
      console.error(`e2e: bulb elements: ${JSON.stringify(bulbs)}`);
    }
    throw e;
  } finally {
    await context?.close();
    try {
      process.kill(-server.pid, 'SIGTERM');
    } catch {
      // already gone
    }
    await Promise.race([exited, new Promise((resolve) => setTimeout(resolve, 10_000))]);
    serverLog.end();
    fs.rmSync(run, { recursive: true, force: true });
  }
}

main().catch((e) => {
  console.error(`e2e: FAILED: ${e.stack ?? e}`);
  process.exit(1);
});
