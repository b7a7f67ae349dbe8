// The Response panel in Chromium from file://: the demo's small-signal figures,
// computed by the core, agree with the native CLI; six plots are drawn; a bad part
// value is reported and the last figures stay.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { execFileSync } from 'child_process';
import path from 'path';
import { fileURLToPath } from 'url';
import { launch, clearStorage, openPanel } from './browser.mjs';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const cell = (page, key) => page.locator(`#panel-response dd[data-key="${key}"]`);

test('the demo response is computed, plotted and agrees with the CLI', async () => {
  const { page, seen } = await openPanel(browser.context, 'response');
  const gain = await cell(page, 'gain').textContent();
  const ac = JSON.parse(execFileSync(path.join(root, 'target/debug/halfrail'), ['analyze', path.join(root, 'src/doc/demo.halfrail.json')])).ac;
  assert.ok(gain.startsWith(`${ac.gain_db.toFixed(2)} dB`), `${gain} vs ${ac.gain_db}`);
  assert.match(await cell(page, 'nf').textContent(), new RegExp(`^${ac.nf_db.toFixed(2)} dB$`));
  assert.equal(await page.locator('#panel-response canvas').count() >= 6, true);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('a bad value elsewhere is reported here and the last figures stay', async () => {
  const { page } = await openPanel(browser.context, 'part');
  await page.getByLabel('Cgs', { exact: true }).fill('4 uH');
  await page.locator('#rail a[href="#response"]').click();
  await page.waitForFunction(() => document.querySelector('#panel-response dd[data-key="gain"]')?.textContent.trim().replace(/^—$/, '') ?? '');
  assert.match(await page.locator('#panel-response p.error').textContent(), /^Cgs: /);
  assert.equal(await page.locator('#panel-response .stale-note').isVisible(), true);
  await page.close();
});

test('a plot pans and zooms from the keyboard and resets', async () => {
  const { page } = await openPanel(browser.context, 'response');
  const plot = page.locator('#panel-response figure.plot').first();
  const xRange = () => plot.getAttribute('data-x-range');
  const before = await xRange();
  await plot.focus();
  await page.keyboard.press('+');
  await page.keyboard.press('+');
  const zoomed = await xRange();
  assert.notEqual(zoomed, before, 'zooming in narrows the frequency range');
  assert.ok(before && zoomed);
  await page.keyboard.press('ArrowRight');
  assert.notEqual(await xRange(), zoomed, 'panning moves them');
  await page.keyboard.press('0');
  assert.equal(await xRange(), before, '0 resets the range');
  await page.close();
});
