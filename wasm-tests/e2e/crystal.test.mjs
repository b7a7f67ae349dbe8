// The Crystal panel from a user's side, in Chromium from file://: the demo's
// oscillator figures equal `halfrail crystal` on the same document; C1 typed larger
// pulls the frequency down and Undo brings it back; a bad value is refused beside
// its field, in words; the four plots are drawn; a design without a crystal gets the
// button that adds one, as one step of undo.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, clearStorage, openPanel, cli, undoButton } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const panel = '#panel-crystal';
const cell = (page, key) => page.locator(`${panel} dd[data-key="${key}"]`);
const valueOf = async (page, key) => Number(await cell(page, key).getAttribute('data-value'));
const computed = (page) => page.locator(panel).getAttribute('data-computed').then(Number);
// Waits until the panel has settled on a result after `n` (no fixed time).
const recomputed = (page, n) => page.waitForFunction((m) => {
  const p = document.getElementById('panel-crystal');
  return Number(p.dataset.computed) > m && p.dataset.follow === 'settled';
}, n);

// The panel's figures by the report's key.
const KEYS = { f_osc: 'f_osc_hz', pull: 'pull_ppm', f_steady: 'f_steady_hz', f_s: 'f_s_hz', cl_eff: 'cl_eff_f', r_neg: 'r_neg_ohm',
  margin: 'margin', gm: 'gm_s', tau: 'tau_s', drive: 'drive_w', im: 'im_a', vpp_gate: 'vpp_gate_v', vpp_out: 'vpp_out_v' };

test('the demo oscillator: the figures equal halfrail crystal, no warnings, the plots drawn', async () => {
  const { page, seen } = await openPanel(browser.context, 'crystal');
  await page.waitForSelector(`${panel}[data-follow="settled"]`);
  const want = cli('crystal', await page.evaluate(() => HR.design.text()));
  for (const [key, field] of Object.entries(KEYS)) {
    const got = await valueOf(page, key);
    assert.ok(Math.abs(got - want[field]) <= 1e-12 * Math.abs(want[field]), `${key}: ${got} against ${want[field]}`);
  }
  // As written: the frequency to nine figures, through the core's formatter (its
  // decimals grouped in threes by thin spaces).
  const written = await page.evaluate((v) => HR.fmt(v, 'Hz', 9), want.f_osc_hz);
  assert.equal((await cell(page, 'f_osc').locator('.value').textContent()).replace(/\u2009/g, ''), written);
  assert.equal(await cell(page, 'spurious').locator('.value').textContent(), 'stable');
  assert.equal(want.warnings.length, 0);
  assert.match(await page.locator(`${panel} .warnings`).textContent(), /^No warnings/);
  // The schematic names the parts with the design's values.
  const drawing = await page.locator(`${panel} svg.crystal-schematic`).textContent();
  for (const part of ['Rf 1M', 'Rs 2k7', 'C1 15.0 pF', 'C2 15.0 pF', '12.8 MHz']) assert.ok(drawing.includes(part), `${part} in ${drawing}`);
  // Three plots and the plane, each with something drawn.
  const plots = page.locator(`${panel} figure.plot:not(.plane)`);
  assert.equal(await plots.count(), 3);
  for (const range of await plots.evaluateAll((fs) => fs.map((f) => f.dataset.xRange || ''))) assert.match(range, /^[\d.e+-]+ [\d.e+-]+$/);
  const inked = await page.locator(`${panel} figure.plane canvas`).evaluate((c) => {
    const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
    const colours = new Set();
    for (let i = 0; i < d.length && colours.size < 8; i += 4 * 37) colours.add(`${d[i]},${d[i + 1]},${d[i + 2]}`);
    return colours.size;
  });
  assert.ok(inked >= 3, `the locus canvas holds ${inked} colours`);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('C1 typed larger pulls the frequency down; Undo brings it back', async () => {
  const { page } = await openPanel(browser.context, 'crystal');
  await page.waitForSelector(`${panel}[data-follow="settled"]`);
  const [f0, pull0] = [await valueOf(page, 'f_osc'), await valueOf(page, 'pull')];
  const n = await computed(page);
  await page.locator(panel).getByLabel('C1 (gate side)', { exact: true }).fill('22p');
  await recomputed(page, n);
  const f1 = await valueOf(page, 'f_osc');
  assert.ok(f1 < f0, `${f1} below ${f0}`);
  assert.ok(await valueOf(page, 'pull') < pull0);
  const want = cli('crystal', await page.evaluate(() => HR.design.text()));
  assert.equal(f1, want.f_osc_hz);
  assert.match(await undoButton(page).getAttribute('title'), /^Undo: C1 .*15.* → .*22/);
  const m = await computed(page);
  await undoButton(page).click();
  await recomputed(page, m);
  assert.equal(await valueOf(page, 'f_osc'), f0);
  assert.equal(await page.locator(panel).getByLabel('C1 (gate side)', { exact: true }).inputValue(), '15p');
  await page.close();
});

test('a bad value is refused beside its field, in words, and the last figures stay', async () => {
  const { page } = await openPanel(browser.context, 'crystal');
  await page.waitForSelector(`${panel}[data-follow="settled"]`);
  const f0 = await valueOf(page, 'f_osc');
  const esr = page.locator(panel).getByLabel('ESR', { exact: true });
  await esr.fill('-3');
  await page.waitForFunction(() => document.querySelector('#panel-crystal .stale-note')?.hidden === false);
  assert.equal(await esr.getAttribute('aria-invalid'), 'true');
  const field = esr.locator('xpath=..');
  assert.match(await field.textContent(), /^ESR.*must be > 0, got -3/);
  // No key of the document is shown.
  assert.ok(!(await page.locator(panel).innerText()).includes('esr_ohm'));
  assert.equal(await valueOf(page, 'f_osc'), f0, 'the last figures stay');
  // Another panel's bad value is said here by its field's name.
  await page.evaluate(() => HR.design.set('part', 'cgs_f', '4 uH', 'test'));
  await page.waitForFunction(() => /^Cgs: /.test(document.querySelector('#panel-crystal p.error').textContent));
  await page.close();
});

test('a design without a crystal: a word of explanation and the button that adds one, undone in one step', async () => {
  const { page } = await openPanel(browser.context, 'crystal');
  await page.waitForSelector(`${panel}[data-follow="settled"]`);
  const f0 = await valueOf(page, 'f_osc');
  await page.evaluate(() => {
    const d = JSON.parse(HR.design.text());
    delete d.crystal;
    delete d.oscillator;
    HR.design.load(JSON.stringify(d), 'without a crystal');
  });
  await page.waitForSelector(`${panel}[data-crystal="absent"]`);
  const add = page.locator(panel).getByRole('button', { name: 'Add a crystal oscillator' });
  assert.equal(await add.isVisible(), true);
  assert.match(await page.locator(`${panel} .crystal-empty`).textContent(), /Pierce crystal oscillator/);
  const n = await computed(page);
  await add.click();
  await page.waitForSelector(`${panel}[data-crystal="present"]`);
  await recomputed(page, n);
  assert.equal(await valueOf(page, 'f_osc'), f0, 'the demo’s oscillator');
  assert.equal(await add.isVisible(), false);
  await undoButton(page).click();
  await page.waitForSelector(`${panel}[data-crystal="absent"]`);
  assert.equal(await page.evaluate(() => HR.design.section('crystal') === undefined && HR.design.section('oscillator') === undefined), true);
  await page.close();
});
