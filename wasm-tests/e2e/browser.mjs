// Launching Debian Chromium for the page tests and the page benchmark, and
// watching a page for network requests and errors.
import fs from 'fs';
import os from 'os';
import path from 'path';
import { fileURLToPath } from 'url';
import { execFileSync } from 'child_process';
import { chromium } from 'playwright-core';

const here = path.dirname(fileURLToPath(import.meta.url));
export const PAGE_PATH = path.resolve(here, '..', '..', 'dist', 'halfrail.html');
export const PAGE_URL = 'file://' + PAGE_PATH;
// The native CLI the page is compared with (built by `make test-e2e`).
export const CLI_PATH = path.resolve(here, '..', '..', 'target', 'debug', 'halfrail');

// `halfrail VERB FILE [FLAGS…]` on the document `text` (written to a scratch file), as JSON.
export function cli(verb, text, ...flags) {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), `halfrail-${verb}-`));
  const file = path.join(dir, 'design.halfrail.json');
  fs.writeFileSync(file, text);
  try {
    return JSON.parse(execFileSync(CLI_PATH, [verb, file, ...flags]));
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

const FLAGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
  '--disable-background-networking', '--disable-component-update', '--disable-sync'];

// A fresh browser with its own empty profile.
export async function launch() {
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'halfrail-profile-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: process.env.CHROMIUM || '/usr/bin/chromium', args: FLAGS, headless: true,
    viewport: { width: 1280, height: 800 },
  });
  return {
    context,
    async close() { await context.close(); fs.rmSync(profile, { recursive: true, force: true }); },
  };
}

// Records what a page does that it must not: fetch anything beyond the page and
// its own frames, log an error, throw, or trip the Content-Security-Policy.
export function watch(page, allowed = []) {
  const seen = { requests: [], errors: [] };
  const bare = (url) => url.split('#')[0];
  const ok = (url) => url.startsWith('data:') || url.startsWith('blob:') || bare(url) === PAGE_URL
    || allowed.some((a) => bare(url) === bare(a));
  page.on('request', (r) => { if (!ok(r.url())) seen.requests.push(r.url()); });
  page.on('console', (m) => { if (m.type() === 'error') seen.errors.push(`console: ${m.text()}`); });
  page.on('pageerror', (e) => seen.errors.push(`page: ${e.message}`));
  return seen;
}

// Waits until the page has started the core and shown its first panel.
export async function ready(frameOrPage) {
  await frameOrPage.waitForSelector('html[data-ready="true"]', { timeout: 15000 });
}

// A blank page from disk: it shares the file:// origin's storage with the page under
// test and runs none of its code, so nothing it does can save over what a test writes
// (the page itself saves its draft once the core has accepted it, after a while).
const BLANK_PATH = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'halfrail-blank-')), 'blank.html');
fs.writeFileSync(BLANK_PATH, '<!doctype html><title>blank</title>');
process.on('exit', () => fs.rmSync(path.dirname(BLANK_PATH), { recursive: true, force: true }));

// Empties the file:// origin's storage (shared by every page opened from disk) and
// writes `entries` ({key: text}) into it, for the next page to start on.
export async function clearStorage(context, entries = {}) {
  const page = await context.newPage();
  await page.goto('file://' + BLANK_PATH);
  await page.evaluate((e) => {
    localStorage.clear();
    for (const [k, v] of Object.entries(e)) localStorage.setItem(k, v);
  }, entries);
  await page.close();
}

// A new page on panel `id`, once its first figures are computed (panels that compute
// mark themselves with data-computed).
export async function openPanel(context, id, { computes = true } = {}) {
  const page = await context.newPage();
  const seen = watch(page);
  await page.goto(`${PAGE_URL}#${id}`);
  await ready(page);
  if (computes) await page.waitForSelector(`#panel-${id}[data-computed]`);
  return { page, seen };
}

// Starts a run of the background panel `id` with its "Compute now" button and, two
// frames later, types a level into the Bench panel (which must be mounted): what the
// Bench panel answered, and whether the run was still going when it did.
export async function editElsewhereDuringRun(page, id) {
  return page.evaluate(async (id) => {
    const panel = document.getElementById(`panel-${id}`);
    const before = panel.dataset.computed;
    const box = panel.querySelector('.run');
    const t0 = performance.now();
    [...panel.querySelectorAll('button')].find((b) => b.textContent === 'Compute now').click();
    await new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)));
    const input = [...document.querySelectorAll('#panel-bench label')].find((x) => x.textContent === 'Level').control;
    input.value = '-45 dBm';
    input.dispatchEvent(new Event('input'));
    return {
      t0,
      vpp: document.querySelector('#panel-bench dd[data-key="vpp"]').textContent,
      // Running: its box shown, or (a panel that shows it only after a while) its follower's state.
      stillRunning: (!box.hidden || panel.dataset.follow === 'running') && panel.dataset.computed === before,
      answeredMs: performance.now() - t0,
    };
  }, id);
}

// Waits until the page (or frame) has drawn `n` more frames: long enough for anything
// an event queued to have happened, with no fixed time to be wrong on a busy machine.
export const framesDrawn = (frameOrPage, n = 2) => frameOrPage.evaluate((count) => new Promise((done) => {
  const step = (left) => (left === 0 ? done() : requestAnimationFrame(() => step(left - 1)));
  step(count);
}), n);

// The page's one Undo and Redo (the Design bar's), for every panel's edits.
export const undoButton = (page) => page.locator('#docbar').getByRole('button', { name: 'Undo', exact: true });
export const redoButton = (page) => page.locator('#docbar').getByRole('button', { name: 'Redo', exact: true });

// An init script (page.addInitScript) that watches the page's background work from
// before its own scripts run: every Worker made (`name url`) and terminated, every
// run posted to one (its entry's name), every animation frame, every value a progress
// bar shows and whether a run box is shown, each with its time. Read it with
// workLog(page).
export const instrumentWork = () => {
  const log = { workers: [], terminated: 0, runs: [], frames: [], progress: [], box: [] };
  window.__work = log;
  const Native = window.Worker;
  window.Worker = class extends Native {
    constructor(url, options) { super(url, options); log.workers.push(`${(options && options.name) || ''} ${url}`); }
    postMessage(data, ...rest) {
      const entry = data && (data.name || (data.calls && data.calls[0][0]));
      if (entry) log.runs.push([performance.now(), entry]);
      return super.postMessage(data, ...rest);
    }
  };
  const terminate = Native.prototype.terminate;
  Native.prototype.terminate = function () { log.terminated += 1; return terminate.call(this); };
  const tick = (t) => { log.frames.push(t); requestAnimationFrame(tick); };
  requestAnimationFrame(tick);
  new MutationObserver((records) => {
    for (const r of records) {
      if (r.target.tagName === 'PROGRESS' && r.attributeName === 'value') log.progress.push([performance.now(), Number(r.target.value)]);
      if (r.target.classList && r.target.classList.contains('run') && r.attributeName === 'hidden') log.box.push([performance.now(), !r.target.hidden]);
    }
  }).observe(document, { subtree: true, attributes: true, attributeFilter: ['value', 'hidden'] });
};
export const workLog = (page) => page.evaluate(() => window.__work);

// An init script (page.addInitScript) that holds the page's background workers: their
// source (the Blob worker.js makes of the glue and its loop) gets one more part, which
// spins for `ms` before answering any message for which `predicate(message)` is true —
// a run surely still going when a test acts on it, or (a long `ms`) a runaway call.
// `predicate` runs in the worker, so it may use nothing from the test's scope.
// Every run goes to a worker while it is held (`halfrailWorkersOnly`: none on the main thread).
export const holdWorkers = (predicate, ms) => `(${(source, ms) => {
  window.halfrailWorkersOnly = true;
  const Native = window.Blob;
  const HOLD = `;(() => {
    const inner = self.onmessage;
    const held = (${source});
    self.onmessage = (e) => {
      let hold = false;
      try { hold = Boolean(held(e.data)); } catch (err) { hold = false; }
      if (hold) {
        const end = Date.now() + ${Number(ms)};
        while (Date.now() < end) { /* a long run */ }
      }
      inner(e);
    };
  })();`;
  window.Blob = class extends Native {
    constructor(parts, options) {
      const worker = options && options.type === 'text/javascript' && parts.some((p) => String(p).includes('self.onmessage'));
      super(worker ? [...parts, HOLD] : parts, options);
    }
  };
}})(${JSON.stringify(String(predicate))}, ${Number(ms)});`;

// The lanes that run whatever panel is shown: the health line's, always on show, and
// the printed sheet's, prepared in the background after edits.
const PAGE_LANES = ['health', 'sheet'];
// The workers a panel's runs made, from workLog's list: all but those of PAGE_LANES.
export const panelWorkers = (log) => log.workers.filter((w) => !PAGE_LANES.some((lane) => w.startsWith(`halfrail-${lane} `)));
// How many workers the panels' runs have started (HR.background.startedIn, less
// PAGE_LANES'), in `page` or a frame.
export const panelWorkersStarted = (page) => page.evaluate((skip) =>
  Object.entries(HR.background.startedIn).filter(([lane]) => !skip.includes(lane)).reduce((sum, [, n]) => sum + n, 0), PAGE_LANES);

// The states of a panel that computes in the background (worker.js's follow()):
// its results counted, its run box, and the follower's state, each waited for.
export const backgroundPanel = (id) => ({
  panel: (page) => page.locator(`#panel-${id}`),
  computed: (page) => page.locator(`#panel-${id}`).getAttribute('data-computed').then(Number),
  results: (page, n) => page.waitForSelector(`#panel-${id}[data-computed="${n}"]`, { timeout: 30000 }),
  runBox: (page) => page.locator(`#panel-${id} .run`),
  // Polled every frame: a run is a few hundred ms, and a locator's wait polls too
  // slowly to be sure to see it.
  runShown: (page) => page.waitForFunction((sel) => !document.querySelector(sel).hidden, `#panel-${id} .run`, { polling: 'raf' }),
  settledAs: (page, state) => page.waitForSelector(`#panel-${id}[data-follow="${state}"]`, { state: 'attached' }),
  // Presses Cancel in the frame the run box is first seen, so a short run cannot
  // end between seeing it and pressing (a click from the test could miss it);
  // returns how many workers had been terminated just before.
  cancelDuringRun: (page) => page.evaluate((sel) => new Promise((done) => {
    const box = document.querySelector(sel);
    const look = () => {
      if (box.hidden) { requestAnimationFrame(look); return; }
      const before = window.__work ? window.__work.terminated : 0;
      box.querySelector('button.cancel').click();
      done(before);
    };
    look();
  }), `#panel-${id} .run`),
});

// An edit of `field` to `first` and, while its run goes, to `second`, on a panel
// `bg` (backgroundPanel) that has shown `n - 1` results: waits for the `n`th and for
// the follower to settle, and returns every text `shownAt` (a selector) showed
// meanwhile — one, the second edit's, when the second run superseded the first.
export async function supersede(page, bg, field, [first, second], n, shownAt) {
  await page.evaluate((sel) => {
    window.__shown = [];
    const node = document.querySelector(sel);
    new MutationObserver(() => window.__shown.push(node.textContent)).observe(node, { childList: true, characterData: true, subtree: true });
  }, shownAt);
  await field.fill(first);
  await bg.runShown(page);
  await field.fill(second);
  await bg.results(page, n);
  await bg.settledAs(page, 'settled');
  return page.evaluate(() => window.__shown);
}
