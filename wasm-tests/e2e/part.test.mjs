// The Part panel in Chromium from file://: the demo design's operating point and
// curves computed by the core, a bad value rejected beside its field with the
// last figures kept, presets with undo, and the bench fit.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { execFileSync } from 'child_process';
import path from 'path';
import { fileURLToPath } from 'url';
import { launch, ready, clearStorage, openPanel, PAGE_URL, undoButton } from './browser.mjs';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const cell = (page, key) => page.locator(`#panel-part dd[data-key="${key}"]`);
const computed = async (page) => Number(await page.locator('#panel-part').getAttribute('data-computed'));
const waitRecompute = (page, before) => page.waitForFunction(
  (n) => Number(document.getElementById('panel-part').dataset.computed) > n, before);

// The same figures from the native CLI (built by `make test-native`), for the page to agree with.
function cliBias() {
  const exe = path.join(root, 'target', 'debug', 'halfrail');
  return JSON.parse(execFileSync(exe, ['analyze', path.join(root, 'src/doc/demo.halfrail.json')])).bias;
}

test('the demo part is computed and matches the native core', async () => {
  const { page, seen } = await openPanel(browser.context, 'part');
  const a0 = await cell(page, 'a0').textContent();
  assert.match(a0, /^-\d+\.\d+ V\/V$/);
  assert.equal(a0, `${cliBias().a0.toFixed(2)} V/V`, 'the page shows the native figure');
  assert.equal(await page.locator('#panel-part canvas').count() >= 2, true, 'both curves are drawn');
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('a bad value is refused beside its field and the last figures stay', async () => {
  const { page } = await openPanel(browser.context, 'part');
  const before = await cell(page, 'iq').textContent();
  const kn = page.getByLabel('kn (NMOS)', { exact: true });
  await kn.fill('-6m');
  await page.waitForFunction(() => document.querySelector('#panel-part [aria-invalid="true"]'));
  assert.equal(await kn.getAttribute('aria-invalid'), 'true');
  const error = await page.locator(`#${await kn.getAttribute('id')}-err`).textContent();
  assert.match(error, /must be > 0, got -0\.006/);
  assert.equal(await cell(page, 'iq').textContent(), before);
  assert.equal(await page.locator('#panel-part .stale-note').first().isVisible(), true);
  // The bad text survives a reload, and the last good figures come back with it.
  await page.reload();
  await ready(page);
  assert.equal(await page.getByLabel('kn (NMOS)', { exact: true }).inputValue(), '-6m');
  await page.waitForFunction(() => document.querySelector('#panel-part dd[data-key="iq"]').textContent !== '—');
  assert.equal(await cell(page, 'iq').textContent(), before);
  // A good value recomputes: more kn draws more current.
  const n = await computed(page);
  await page.getByLabel('kn (NMOS)', { exact: true }).fill('12m');
  await waitRecompute(page, n);
  assert.notEqual(await cell(page, 'iq').textContent(), before);
  await page.close();
});

test('a preset loads and can be undone; a buffered part shows each stage', async () => {
  const { page } = await openPanel(browser.context, 'part');
  const supply = page.getByLabel('Supply', { exact: true });
  const original = await supply.inputValue();
  await page.getByLabel('Preset (illustrative, not a datasheet)').selectOption('buffered-5v');
  const n = await computed(page);
  await page.getByRole('button', { name: 'Load preset' }).click();
  await waitRecompute(page, n);
  assert.equal(await supply.inputValue(), '5');
  assert.equal(await page.getByLabel('Stages', { exact: true }).first().inputValue(), '3');
  assert.equal(await page.locator('#panel-part tbody tr').count() >= 3, true, 'one row per stage');
  await undoButton(page).click();
  await page.waitForFunction((v) => document.querySelector('#panel-part input').value !== '' &&
    [...document.querySelectorAll('#panel-part input')].some((i) => i.value === v), original);
  assert.equal(await supply.inputValue(), original);
  await page.close();
});

test('the bench fit runs and its part can be used', async () => {
  const { page, seen } = await openPanel(browser.context, 'part');
  await page.getByRole('button', { name: 'Fit the part' }).click();
  const rows = page.locator('#panel-part table').filter({ hasText: 'Fitted parameters' }).locator('tbody tr');
  await rows.first().waitFor();
  assert.deepEqual(await rows.locator('th').allTextContents(), ['kn', 'kp', 'lambda', 'capacitance (sum)']);
  const n = await computed(page);
  await page.getByRole('button', { name: 'Use this part' }).click();
  await waitRecompute(page, n);
  assert.notEqual(await page.getByLabel('kn (NMOS)', { exact: true }).inputValue(), '6m');
  // A reading that cannot be read is refused at the readings box.
  await page.getByLabel('Open-loop gain readings').fill('100 kHz, lots');
  await page.getByRole('button', { name: 'Fit the part' }).click();
  await page.waitForFunction(() => document.querySelector('#panel-part textarea[aria-invalid="true"]'));
  assert.deepEqual(seen.errors, []);
  await page.close();
});
