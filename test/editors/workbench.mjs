#!/usr/bin/env node
// Scripted look at eigenlens in the real VS Code workbench (opt-in: `npm run look`).
//
// Packages the .vsix, installs the open-source VS Code workbench (code-server, from the npm
// registry, into a cache outside the repository), installs the .vsix into a fresh profile,
// opens each demo file in headless Chromium, hovers the state matrix like a user and saves
// screenshots plus the text the workbench shows (hover, code lenses, squiggles) into
// .editor-look/ (gitignored). A person then looks at the pictures: this is not a test with
// a verdict, it prints what it saw and where the pictures are.
//
// Usage: node test/editors/workbench.mjs [--files a.py,b.lti] [--out DIR] [--no-package]
//                                         [--install-only] [--keep]
// Environment: EIGENLENS_LOOK_HOME (cache, default ~/.cache/eigenlens-look),
//              CHROMIUM (browser, default /usr/bin/chromium).
// Needs: Node 20, the npm registry once (then offline), Debian chromium, ripgrep, g++, make,
// python3, libkrb5-dev (native modules of the workbench are compiled from source).
import { execFileSync, spawn } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, symlinkSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { createServer } from 'node:net';
import { homedir, tmpdir } from 'node:os';
import { basename, dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const WORKBENCH_VERSION = '4.100.3'; // VS Code 1.100.3: the newest code-server whose engines.node is 20
const DRIVER_VERSION = '1.65.1'; // playwright-core; drives the system chromium, downloads no browser
const repo = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const cache = resolve(process.env.EIGENLENS_LOOK_HOME ?? join(homedir(), '.cache', 'eigenlens-look'));
const chromiumPath = process.env.CHROMIUM ?? '/usr/bin/chromium';

const args = parseArgs(process.argv.slice(2));
const started = Date.now();
const say = (line) => console.log(`[look ${((Date.now() - started) / 1000).toFixed(1)}s] ${line}`);

// ----------------------------------------------------------------------------------------
// Installing the workbench and the browser driver (idempotent; a marker file per version)

function run(cmd, cmdArgs, options = {}) {
  execFileSync(cmd, cmdArgs, { stdio: ['ignore', 'inherit', 'inherit'], ...options });
}

function installWorkbench() {
  const root = join(cache, 'workbench');
  const marker = join(root, `.ready-${WORKBENCH_VERSION}`);
  const entry = join(root, 'node_modules', 'code-server', 'out', 'node', 'entry.js');
  if (existsSync(marker)) return entry;
  say(`installing the workbench ${WORKBENCH_VERSION} into ${root} (a few minutes, once)`);
  for (const tool of ['rg', 'g++', 'make', 'python3']) {
    try {
      execFileSync('sh', ['-c', `command -v ${tool}`], { stdio: 'ignore' });
    } catch {
      throw new Error(`${tool} is missing; on Debian: apt-get install ripgrep g++ make python3 libkrb5-dev chromium`);
    }
  }
  rmSync(root, { recursive: true, force: true });
  mkdirSync(root, { recursive: true });
  writeFileSync(join(root, 'package.json'), JSON.stringify({ name: 'eigenlens-look-workbench', private: true }));
  const npmEnv = {
    ...process.env,
    // node-gyp: use the headers of the running Node instead of downloading them.
    npm_config_nodedir: resolve(dirname(process.execPath), '..'),
    // node-pty's build runs `npx node-gyp`, which must not stop to ask.
    npm_config_yes: 'true',
  };
  const quiet = ['--no-audit', '--no-fund', '--loglevel=error'];
  // Install scripts off at first: some would download binaries from outside the npm registry.
  run('npm', ['install', '--ignore-scripts', ...quiet, `code-server@${WORKBENCH_VERSION}`], { cwd: root, env: npmEnv });
  const pkg = join(root, 'node_modules', 'code-server');
  run('npm', ['rebuild', 'argon2', ...quiet], { cwd: root, env: npmEnv });
  const vscodeDir = join(pkg, 'lib', 'vscode');
  run('npm', ['install', '--omit=dev', '--ignore-scripts', ...quiet], { cwd: vscodeDir, env: npmEnv });
  // The search binary comes from Debian; with bin/ present, its package's own script is a no-op.
  const rgBin = join(vscodeDir, 'node_modules', '@vscode', 'ripgrep', 'bin');
  mkdirSync(rgBin, { recursive: true });
  rmSync(join(rgBin, 'rg'), { force: true });
  symlinkSync(execFileSync('sh', ['-c', 'command -v rg'], { encoding: 'utf8' }).trim(), join(rgBin, 'rg'));
  run('npm', ['rebuild', ...quiet], { cwd: vscodeDir, env: npmEnv }); // now compile native modules
  // What code-server's own postinstall would have done.
  rmSync(join(vscodeDir, 'node_modules.asar'), { recursive: true, force: true });
  symlinkSync('node_modules', join(vscodeDir, 'node_modules.asar'));
  const link = (dir, target, name) => {
    rmSync(join(dir, name), { force: true });
    symlinkSync(target, join(dir, name));
  };
  link(join(vscodeDir, 'bin', 'remote-cli'), 'code-linux.sh', 'code-server');
  link(join(vscodeDir, 'bin', 'helpers'), 'browser-linux.sh', 'browser.sh');
  run('npm', ['install', '--omit=dev', ...quiet], { cwd: join(vscodeDir, 'extensions'), env: npmEnv });
  writeFileSync(marker, new Date().toISOString());
  say('workbench installed');
  return entry;
}

function installDriver() {
  const root = join(cache, 'driver');
  const pkg = join(root, 'node_modules', 'playwright-core', 'package.json');
  if (!existsSync(pkg)) {
    mkdirSync(root, { recursive: true });
    writeFileSync(join(root, 'package.json'), JSON.stringify({ name: 'eigenlens-look-driver', private: true }));
    run('npm', ['install', '--no-audit', '--no-fund', '--loglevel=error', `playwright-core@${DRIVER_VERSION}`], { cwd: root });
  }
  return createRequire(pkg)('playwright-core');
}

// ----------------------------------------------------------------------------------------
// Where the state matrix of a demo file is written: the line and column a user would hover

const STATE_NAME = /^(?:A|F|Phi)(?:_?[A-Za-z0-9]*)?$/;

function stateMatrixPosition(text, file) {
  const lines = text.split('\n');
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i];
    const m = file.endsWith('.lti')
      ? /^(\s*)([A-Za-z]\w*)\s*:/.exec(line)
      : /^(\s*(?:export\s+)?(?:const\s+|let\s+)?)([A-Za-z_]\w*)\s*(?::[^=]*)?=\s*(?:np\.array\(|numpy\.array\(|\[)/.exec(line);
    if (m && STATE_NAME.test(m[2])) return { line: i + 1, col: m[1].length + 1, name: m[2] };
  }
  return { line: 1, col: 1, name: '(none found)' };
}

// ----------------------------------------------------------------------------------------
// Driving the workbench

const wait = (ms) => new Promise((r) => setTimeout(r, ms));

async function freePort() {
  return new Promise((res, rej) => {
    const srv = createServer();
    srv.once('error', rej);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address();
      srv.close(() => res(port));
    });
  });
}

async function until(what, timeoutMs, probe) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe().catch(() => undefined);
    if (value) return value;
    if (Date.now() > deadline) return undefined;
    await wait(250);
  }
}

/** Everything the editor shows about eigenlens for the visible part of the active editor. */
async function readEditorState(page) {
  return page.evaluate(() => {
    const editor = document.querySelector('.editor-group-container.active .monaco-editor') ?? document.querySelector('.monaco-editor');
    if (!editor) return null;
    const lineOf = (el) => {
      const top = el.getBoundingClientRect().top;
      let best = null;
      for (const ln of editor.querySelectorAll('.margin-view-overlays .line-numbers')) {
        const r = ln.getBoundingClientRect();
        if (r.top >= top - 2 && (best === null || r.top < best.top)) best = { top: r.top, text: ln.textContent.trim() };
      }
      return best ? best.text : '?';
    };
    const lenses = [...editor.querySelectorAll('.codelens-decoration')].map((el) => `${lineOf(el)}: ${el.textContent.trim()}`);
    const count = (cls) => editor.querySelectorAll(cls).length;
    return {
      lenses,
      squiggles: { error: count('.squiggly-error'), warning: count('.squiggly-warning'), info: count('.squiggly-info'), hint: count('.squiggly-hint') },
    };
  });
}

async function visibleHover(page) {
  return page.evaluate(() => {
    for (const el of document.querySelectorAll('.monaco-hover')) {
      const r = el.getBoundingClientRect();
      const text = el.innerText.trim();
      if (r.width > 20 && r.height > 10 && text && !/^Loading\.\.\.$/.test(text) && getComputedStyle(el).visibility !== 'hidden') {
        const scroller = el.querySelector('.monaco-scrollable-element') ?? el;
        const images = [...el.querySelectorAll('img')].map((img) => ({
          loaded: img.complete && img.naturalWidth > 0,
          natural: [img.naturalWidth, img.naturalHeight],
          shown: [Math.round(img.getBoundingClientRect().width), Math.round(img.getBoundingClientRect().height)],
          src: img.src.slice(0, 40),
        }));
        const content = el.querySelector('.hover-contents, .monaco-hover-content') ?? el;
        return {
          box: { x: Math.round(r.x), y: Math.round(r.y), width: Math.round(r.width), height: Math.round(r.height) },
          text,
          scrolls: content.scrollHeight > scroller.clientHeight + 2 || content.scrollWidth > scroller.clientWidth + 2,
          images,
        };
      }
    }
    return null;
  });
}

async function aimAtCursor(page) {
  return page.evaluate(() => {
    const editor = document.querySelector('.editor-group-container.active .monaco-editor') ?? document.querySelector('.monaco-editor');
    const cursor = editor?.querySelector('.cursors-layer .cursor');
    if (!cursor) return null;
    const r = cursor.getBoundingClientRect();
    // The character right of the cursor: half a character width to the right.
    const sample = editor.querySelector('.view-line span span');
    const charWidth = sample && sample.textContent.length ? sample.getBoundingClientRect().width / sample.textContent.length : 8;
    return { x: r.left + Math.max(2, charWidth / 2), y: r.top + r.height / 2 };
  });
}

async function openAt(page, absPath, line, col) {
  const quickInput = page.locator('.quick-input-widget input');
  const activeTabIs = (name) =>
    page.evaluate((n) => [...document.querySelectorAll('.tab.active')].some((t) => t.textContent.includes(n)), name);
  // Quick Open with the absolute path; retried because an early Ctrl+P can land before the
  // workbench's keybindings are ready, and a hover left open can swallow the first key.
  let opened = false;
  for (let attempt = 0; attempt < 3 && !opened; attempt++) {
    // Take the mouse out of any open hover (a hover under the mouse stays open and keeps focus).
    await page.mouse.move(200, 700);
    await page.keyboard.press('Escape');
    await page.keyboard.press('Escape');
    await page.locator('.part.editor').first().click({ position: { x: 400, y: 600 } }).catch(() => undefined);
    await page.keyboard.press('Control+KeyP');
    if (!(await until('quick open', 5000, () => quickInput.isVisible()))) continue;
    await quickInput.fill(absPath);
    const name = basename(absPath);
    const listed = await until('quick open result', 10_000, () =>
      page.evaluate((n) => [...document.querySelectorAll('.quick-input-list .monaco-list-row')].some((r) => r.textContent.includes(n)), name),
    );
    if (!listed) continue;
    await page.keyboard.press('Enter');
    opened = Boolean(await until('editor tab', 10_000, () => activeTabIs(basename(absPath))));
  }
  if (!opened) throw new Error(`could not open ${absPath} with Quick Open`);
  // Go to Line, checked against the status bar's "Ln N, Col M".
  const where = () => page.evaluate(() => document.querySelector('#status\\.editor\\.selection')?.textContent?.trim() ?? '');
  for (let attempt = 0; attempt < 4; attempt++) {
    await page.keyboard.press('Control+KeyG');
    if (!(await until('go to line', 5000, () => quickInput.isVisible()))) continue;
    await quickInput.fill(`:${line}:${col}`);
    await wait(200);
    await page.keyboard.press('Enter');
    const at = await until('cursor moved', 3000, async () => ((await where()).startsWith(`Ln ${line}, Col ${col}`) ? await where() : undefined));
    if (at) return;
  }
  throw new Error(`Go to Line ${line}:${col} did not move the cursor (status bar: ${await where()})`);
}

async function hoverLikeAUser(page, timeoutMs) {
  const deadline = Date.now() + timeoutMs;
  let how = 'mouse';
  while (Date.now() < deadline) {
    const aim = await aimAtCursor(page);
    if (aim) {
      await page.mouse.move(aim.x - 40, aim.y + 60);
      await page.mouse.move(aim.x, aim.y, { steps: 4 });
    }
    const viaMouse = await until('hover', 5000, () => visibleHover(page));
    if (viaMouse) return { how, ...viaMouse };
    how = 'keyboard';
    await page.keyboard.press('Control+KeyK');
    await page.keyboard.press('Control+KeyI');
    const viaKeys = await until('hover', 3000, () => visibleHover(page));
    if (viaKeys) return { how, ...viaKeys };
    how = 'mouse';
  }
  return null;
}

function newestLogs(profile, outDir) {
  // The client's output channel and the extension host log, for diagnosis.
  const found = [];
  const walk = (dir) => {
    for (const name of readdirSync(dir, { withFileTypes: true })) {
      const p = join(dir, name.name);
      if (name.isDirectory()) walk(p);
      else if (/eigenlens|exthost\.log$|remoteexthost\.log$/i.test(name.name)) found.push(p);
    }
  };
  try {
    walk(profile);
  } catch {
    /* no logs */
  }
  for (const p of found) copyFileSync(p, join(outDir, `log-${basename(p)}`));
  return found.map((p) => `log-${basename(p)}`);
}

async function lookAtFile(page, file, outDir, workspace) {
  const abs = join(workspace, file);
  const text = readFileSync(abs, 'utf8');
  const at = stateMatrixPosition(text, file);
  const tag = file.replace(/[^\w.-]+/g, '_');
  say(`${file}: hovering ${at.name} at line ${at.line}, column ${at.col}`);
  await openAt(page, abs, at.line, at.col);
  // Lenses and squiggles arrive after the server analysed the file.
  const state = await until('lenses or squiggles', 30_000, async () => {
    const s = await readEditorState(page);
    return s && (s.lenses.length > 0 || Object.values(s.squiggles).some((n) => n > 0)) ? s : undefined;
  });
  await wait(800); // late lenses push lines down; let the layout settle before aiming
  const hover = await hoverLikeAUser(page, 25_000);
  const finalState = (await readEditorState(page)) ?? state;
  await page.screenshot({ path: join(outDir, `${tag}-full.png`) });
  if (hover) {
    const clip = {
      x: Math.max(0, hover.box.x - 10),
      y: Math.max(0, hover.box.y - 30),
      width: Math.min(1400 - Math.max(0, hover.box.x - 10), hover.box.width + 20),
      height: Math.min(900 - Math.max(0, hover.box.y - 30), hover.box.height + 60),
    };
    await page.screenshot({ path: join(outDir, `${tag}-hover.png`), clip });
    if (hover.scrolls) {
      // What a user finds after scrolling the hover (the plot usually sits below the fold).
      await page.mouse.move(hover.box.x + hover.box.width / 2, hover.box.y + hover.box.height / 2, { steps: 3 });
      for (let step = 0; step < 12; step++) {
        await page.mouse.wheel(0, 250); // small steps: the hover scrolls by a bounded amount per event
        await wait(80);
      }
      await wait(400);
      await page.screenshot({ path: join(outDir, `${tag}-hover-scrolled.png`), clip });
    }
  }
  const problems = await page.evaluate(() => document.querySelector('#status\\.problems')?.textContent?.trim() ?? '');
  const summary = { file, position: at, hover, lenses: finalState?.lenses ?? [], squiggles: finalState?.squiggles ?? null, statusBarProblems: problems };
  writeFileSync(join(outDir, `${tag}.json`), JSON.stringify(summary, null, 2));
  await page.keyboard.press('Escape');
  return summary;
}

async function lookAtReport(page, outDir) {
  // The palette command on the last opened file: opens the read-only report beside it.
  await page.keyboard.press('Control+Shift+KeyP');
  await wait(500);
  await page.keyboard.type('eigenlens: Show Full Analysis', { delay: 5 });
  await wait(700);
  await page.keyboard.press('Enter');
  const opened = await until('report tab', 15_000, async () =>
    page.evaluate(() => [...document.querySelectorAll('.tab')].some((t) => /\.md/.test(t.textContent) && /matri/.test(t.textContent))),
  );
  await wait(1500);
  await page.screenshot({ path: join(outDir, 'report-full.png') });
  return Boolean(opened);
}

async function runPaletteCommand(page, title) {
  await page.keyboard.press('Escape');
  await page.keyboard.press('Control+Shift+KeyP');
  const input = page.locator('.quick-input-widget input');
  await until('command palette', 5000, () => input.isVisible());
  await input.fill(`>${title}`);
  await wait(700);
  await page.keyboard.press('Enter');
}

/** The palette commands that change or ask something, on the file currently open. */
async function lookAtCommands(page, outDir, file) {
  const notes = {};
  // Switch Continuous/Discrete rewrites the pragma in the buffer; undone afterwards, never saved.
  await page.locator('.editor-group-container.active .monaco-editor .view-lines').first().click({ position: { x: 5, y: 5 } }).catch(() => undefined);
  const before = await readEditorState(page);
  await runPaletteCommand(page, 'eigenlens: Switch Continuous/Discrete');
  await wait(3000);
  const after = await readEditorState(page);
  await page.screenshot({ path: join(outDir, 'switch-domain.png') });
  notes.switchDomain = { file, lensesBefore: before?.lenses ?? [], lensesAfter: after?.lenses ?? [] };
  await page.keyboard.press('Escape');
  await page.keyboard.press('Control+KeyZ');
  await wait(1500);
  notes.switchDomain.lensesAfterUndo = (await readEditorState(page))?.lenses ?? [];
  // Discretize at Period…: the input box, then whatever the server answers.
  await runPaletteCommand(page, 'eigenlens: Discretize at Period');
  const input = page.locator('.quick-input-widget input');
  if (await until('period input', 5000, () => input.isVisible())) {
    await input.fill('0');
    await wait(400);
    notes.discretizeRejectsZero = await page.evaluate(() => document.querySelector('.quick-input-message')?.textContent?.trim() ?? '');
    await input.fill('0.01');
    await page.keyboard.press('Enter');
    await wait(2500);
    notes.discretizeToasts = await page.evaluate(() => [...document.querySelectorAll('.notifications-toasts .notification-list-item-message')].map((e) => e.textContent.trim()));
    await page.screenshot({ path: join(outDir, 'discretize.png') });
    await page.keyboard.press('Control+KeyZ');
  }
  return notes;
}

async function main() {
  const outDir = resolve(args.out ?? join(repo, '.editor-look', new Date().toISOString().replace(/[:.]/g, '-')));
  mkdirSync(outDir, { recursive: true });

  if (!existsSync(chromiumPath)) throw new Error(`no browser at ${chromiumPath}; on Debian: apt-get install chromium (or set CHROMIUM)`);
  const entry = installWorkbench();
  const driver = installDriver();
  if (args['install-only']) return say('installed; nothing else asked');

  const vsix = join(repo, 'dist', 'eigenlens.vsix');
  if (!args['no-package']) {
    // The same steps as `npm run package`, with base URLs so vsce accepts the README's
    // relative links (it refuses them when the repository is not on a host it knows).
    say('packaging the extension (build + vsce package)');
    run(process.execPath, ['scripts/build.mjs'], { cwd: repo });
    const base = String(JSON.parse(readFileSync(join(repo, 'package.json'), 'utf8')).repository?.url ?? 'https://example.invalid/eigenlens')
      .replace(/\.git$/, '') + '/';
    run(process.execPath, [join(repo, 'node_modules', '@vscode', 'vsce', 'vsce'), 'package', '--no-dependencies',
      '--baseContentUrl', base, '--baseImagesUrl', base, '-o', vsix], { cwd: repo });
  }
  if (!existsSync(vsix)) throw new Error(`${vsix} is missing; run npm run package`);
  say(`package: ${relative(repo, vsix)}, ${(statSync(vsix).size / 1024).toFixed(0)} KiB`);

  // A fresh profile each time: nothing from an earlier run or from the machine leaks in.
  const profile = mkdtempSync(join(tmpdir(), 'eigenlens-look-'));
  const userData = join(profile, 'user-data');
  const extensions = join(profile, 'extensions');
  mkdirSync(join(userData, 'User'), { recursive: true });
  writeFileSync(
    join(userData, 'User', 'settings.json'),
    JSON.stringify({
      'telemetry.telemetryLevel': 'off',
      'update.mode': 'none',
      'extensions.autoCheckUpdates': false,
      'extensions.autoUpdate': false,
      'security.workspace.trust.enabled': false,
      'workbench.startupEditor': 'none',
      'workbench.tips.enabled': false,
      'workbench.enableExperiments': false,
      'editor.cursorBlinking': 'solid',
      'editor.hover.delay': 300,
      'window.restoreWindows': 'none',
      ...(args.settings ? JSON.parse(readFileSync(args.settings, 'utf8')) : {}),
    }),
  );
  const xdg = { XDG_CONFIG_HOME: join(profile, 'config'), XDG_DATA_HOME: join(profile, 'data'), XDG_CACHE_HOME: join(profile, 'cache') };
  const csEnv = { ...process.env, ...xdg, HOME: profile };
  say('installing the .vsix into the fresh profile');
  const installLog = execFileSync(process.execPath, [entry, '--user-data-dir', userData, '--extensions-dir', extensions, '--install-extension', vsix], {
    env: csEnv,
    encoding: 'utf8',
  });
  writeFileSync(join(outDir, 'install-extension.log'), installLog);

  const workspace = resolve(args.folder ?? join(repo, 'test', 'demo'));
  const files = args.files
    ? args.files.split(',')
    : readdirSync(workspace).filter((f) => /\.(py|ts|js|lti)$/.test(f)).sort();
  const port = await freePort();
  const server = spawn(
    process.execPath,
    [entry, '--auth', 'none', '--bind-addr', `127.0.0.1:${port}`, '--disable-telemetry', '--disable-update-check',
      '--disable-workspace-trust', '--disable-getting-started-override', '--user-data-dir', userData, '--extensions-dir', extensions, workspace],
    { env: csEnv, detached: true, stdio: ['ignore', 'pipe', 'pipe'] },
  );
  let serverLog = '';
  server.stdout.on('data', (d) => (serverLog += d));
  server.stderr.on('data', (d) => (serverLog += d));
  const stopServer = () => {
    try {
      process.kill(-server.pid, 'SIGKILL'); // its own group: the extension host and our server go too
    } catch {
      /* already gone */
    }
  };
  process.on('exit', stopServer);

  let browser;
  const summaries = [];
  let commandNotes = {};
  try {
    const up = await until('workbench answering', 60_000, async () => (await fetch(`http://127.0.0.1:${port}/healthz`)).ok);
    if (!up) throw new Error(`the workbench did not answer on port ${port}:\n${serverLog.slice(-2000)}`);
    say(`workbench answering on 127.0.0.1:${port}`);
    browser = await driver.chromium.launch({ executablePath: chromiumPath, args: ['--no-sandbox', '--disable-gpu'] });
    const page = await browser.newPage({ viewport: { width: 1400, height: 900 } });
    const consoleErrors = [];
    page.on('console', (m) => m.type() === 'error' && consoleErrors.push(m.text()));
    await page.goto(`http://127.0.0.1:${port}/?folder=${encodeURIComponent(workspace)}`);
    const loaded = await until('workbench loaded', 90_000, async () => (await page.locator('.monaco-workbench .part.editor').count()) > 0);
    if (!loaded) throw new Error('the workbench page did not load');
    await wait(3000); // keybindings are registered a little after the first paint
    say('workbench loaded');
    for (const file of files) {
      try {
        summaries.push(await lookAtFile(page, file, outDir, workspace));
      } catch (err) {
        await page.screenshot({ path: join(outDir, `${file}-error.png`) }).catch(() => undefined);
        summaries.push({ file, error: String(err) });
      }
    }
    const commands = (commandNotes = await lookAtCommands(page, outDir, files[files.length - 1]).catch((err) => ({ error: String(err) })));
    const reportOpened = await lookAtReport(page, outDir).catch((err) => String(err));
    writeFileSync(join(outDir, 'console-errors.txt'), consoleErrors.join('\n'));
    writeFileSync(join(outDir, 'summary.json'), JSON.stringify({ files: summaries, commands, reportOpened }, null, 2));
  } finally {
    await browser?.close().catch(() => undefined);
    writeFileSync(join(outDir, 'workbench.log'), serverLog);
    const logs = newestLogs(profile, outDir);
    stopServer();
    if (!args.keep) rmSync(profile, { recursive: true, force: true });
    else say(`profile kept: ${profile}`);
    say(`logs copied: ${logs.join(', ') || 'none'}`);
  }

  for (const s of summaries) {
    if (s.error) {
      say(`${s.file}: FAILED ${s.error}`);
      continue;
    }
    const sq = s.squiggles ? Object.entries(s.squiggles).filter(([, n]) => n).map(([k, n]) => `${n} ${k}`).join(', ') || 'none' : '?';
    say(`${s.file}: hover ${s.hover ? `${s.hover.box.width}x${s.hover.box.height}px via ${s.hover.how}${s.hover.scrolls ? ', scrolls' : ''}, ${s.hover.images.length} image(s)` : 'NONE'}; lenses ${s.lenses.length}; squiggles ${sq}`);
  }
  say(`commands: ${JSON.stringify(commandNotes)}`);
  say(`screenshots and text in ${outDir}`);
}

function parseArgs(argv) {
  const out = {};
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (!a.startsWith('--')) throw new Error(`unexpected argument ${a}`);
    const key = a.slice(2);
    if (['install-only', 'no-package', 'keep'].includes(key)) out[key] = true;
    else out[key] = argv[++i];
  }
  return out;
}

main().catch((err) => {
  console.error(`[look] ${err instanceof Error ? err.message : err}`);
  process.exit(1);
});
