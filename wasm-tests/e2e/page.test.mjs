// End-to-end tests of dist/halfrail.html in Debian Chromium, opened from file://,
// inside an iframe of another local page, and over http.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'fs';
import http from 'http';
import os from 'os';
import path from 'path';
import { launch, watch, ready, clearStorage, PAGE_PATH, PAGE_URL } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
// Every test starts from an empty store (the file:// origin's storage is shared).
beforeEach(() => clearStorage(browser.context));

const levelInput = (page) => page.getByLabel('Level', { exact: true });
const cell = (page, key) => page.locator(`#panel-bench dd[data-key="${key}"]`);

test('opens from file:// with no network request and no console error', async () => {
  const page = await browser.context.newPage();
  const seen = watch(page);
  const violations = [];
  await page.exposeFunction('reportViolation', (v) => violations.push(v));
  await page.addInitScript(() => document.addEventListener('securitypolicyviolation',
    (e) => window.reportViolation(`${e.violatedDirective} ${e.blockedURI}`)));
  await page.goto(PAGE_URL + '#bench');
  await ready(page);
  // The demo values are computed: -30 dBm at 50 Ω is 20.00 mVpp (common practice).
  assert.equal(await cell(page, 'vpp').textContent(), '20.00 mVpp');
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(violations, []);
  const csp = await page.locator('meta[http-equiv="Content-Security-Policy"]').getAttribute('content');
  assert.match(csp, /default-src 'none'/);
  assert.match(csp, /connect-src 'none'/);
  await page.close();
});

test('a typed conversion is read back, and a bad one keeps the last result', async () => {
  const page = await browser.context.newPage();
  const seen = watch(page);
  await page.goto(PAGE_URL + '#bench');
  await ready(page);
  await levelInput(page).fill('-45 dBm');
  // -45 dBm across 50 Ω: 31.62 nW, 1.257 mVrms, 3.557 mVpp.
  assert.equal(await cell(page, 'vpp').textContent(), '3.557 mVpp');
  assert.equal(await cell(page, 'w').textContent(), '31.62 nW');
  await levelInput(page).fill('-45 dBx');
  assert.equal(await levelInput(page).getAttribute('aria-invalid'), 'true');
  const error = page.locator('#panel-bench .error').first();
  assert.match(await error.textContent(), /dBx/);
  assert.equal(await cell(page, 'vpp').textContent(), '3.557 mVpp', 'the last good result stays');
  assert.equal(await page.locator('#panel-bench .stale-note').first().isVisible(), true);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('inputs survive a reload, bad text included', async () => {
  const page = await browser.context.newPage();
  await page.goto(PAGE_URL + '#bench');
  await ready(page);
  await levelInput(page).fill('-12 dBm');
  await page.getByLabel('Value', { exact: true }).fill('8k2');
  await page.getByLabel('Across', { exact: true }).fill('75 ohm');
  await levelInput(page).fill('-12 dBmm');
  await page.reload();
  await ready(page);
  assert.equal(await levelInput(page).inputValue(), '-12 dBmm');
  assert.equal(await page.getByLabel('Across', { exact: true }).inputValue(), '75 ohm');
  assert.equal(await page.getByLabel('Value', { exact: true }).inputValue(), '8k2');
  // The last good level is still shown, marked stale: -12 dBm = 63.10 µW, and across
  // 75 Ω that is √(63.10 µW · 75 Ω) = 68.79 mVrms.
  assert.equal(await cell(page, 'vrms').textContent(), '68.79 mVrms');
  assert.match(await page.locator('#panel-bench .error').first().textContent(), /dBmm/);
  await page.close();
});

test('standard values and the ratio finder answer from the core', async () => {
  const page = await browser.context.newPage();
  await page.goto(PAGE_URL + '#bench');
  await ready(page);
  await page.getByLabel('Value', { exact: true }).fill('5k');
  const row = page.locator('#panel-bench tr', { has: page.locator('th', { hasText: /^E24$/ }) });
  const cells = await row.locator('td').allTextContents();
  assert.deepEqual(cells.slice(1, 5), ['5.10k', '+2.00 %', '4.70k', '5.10k']);
  assert.equal(cells[5], '5k1');
  await page.getByLabel('Ratio wanted').fill('20 dB');
  const best = await page.locator('#panel-bench table').nth(1).locator('tbody tr').first().locator('td').allTextContents();
  assert.equal(best[2], '10.000');
  assert.equal(best[3], '+0.00 %', 'a ratio of 10 is exact in any series');
  await page.close();
});

test('every panel has an anchor and is reachable from the keyboard', async () => {
  const page = await browser.context.newPage();
  await page.goto(PAGE_URL + '#loop');
  await ready(page);
  assert.equal(await page.locator('#panel-loop').isVisible(), true);
  const names = await page.locator('#rail a').allTextContents();
  assert.deepEqual(names.map((n) => n.replace(' · soon', '')),
    ['Brief', 'Part', 'Stage', 'Response', 'Loop', 'Swing', 'Spread', 'Chain', 'Crystal', 'Bench']);
  const bench = page.locator('#rail a[href="#bench"]');
  await bench.focus();
  await page.keyboard.press('Enter');
  await page.waitForSelector('#panel-bench:not([hidden])');
  assert.equal(await bench.getAttribute('aria-current'), 'page');
  await page.close();
});

test('works inside an iframe of another local page', async () => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'halfrail-host-'));
  const host = path.join(dir, 'wiki.html');
  fs.writeFileSync(host, `<!doctype html><title>host</title><h1>Lab wiki</h1>
    <iframe id="calc" src="${PAGE_URL}#bench" width="1100" height="700"></iframe>`);
  const page = await browser.context.newPage();
  const seen = watch(page, ['file://' + host, PAGE_URL + '#bench']);
  await page.goto('file://' + host);
  const frame = page.frameLocator('#calc');
  await frame.locator('html[data-ready="true"]').waitFor({ timeout: 15000 });
  await frame.getByLabel('Level', { exact: true }).fill('0 dBm');
  // 0 dBm across 50 Ω = 223.6 mVrms (common practice).
  assert.equal(await frame.locator('dd[data-key="vrms"]').textContent(), '223.6 mVrms');
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

test('works served over http', async () => {
  const server = http.createServer((req, res) => {
    res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' });
    res.end(fs.readFileSync(PAGE_PATH));
  });
  await new Promise((r) => server.listen(0, '127.0.0.1', r));
  const url = `http://127.0.0.1:${server.address().port}/halfrail.html#bench`;
  const page = await browser.context.newPage();
  const seen = watch(page, [url]);
  await page.goto(url);
  await ready(page);
  assert.equal(await cell(page, 'vpp').textContent(), '20.00 mVpp');
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
  server.close();
});
