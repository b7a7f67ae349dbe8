// The Loop panel in Chromium from file://: the demo's loop is stable and every plot
// is drawn; the buffered (three-stage) part oscillates, the helper's r_fb change is
// applied through the design and undone; the figures agree with the native CLI.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, clearStorage, openPanel, cli, undoButton } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const verdict = (page) => page.locator('#panel-loop .verdict-head').textContent();
const figure = (page, key) => page.locator(`#panel-loop dd[data-key="${key}"]`).textContent();
const count = (page) => page.locator('#panel-loop').getAttribute('data-computed').then(Number);
const recomputed = (page, n) => page.waitForFunction((m) => Number(document.getElementById('panel-loop').dataset.computed) > m, n);
const rfb = (page) => page.evaluate(() => String(HR.design.get('stage', 'r_fb_ohm')));

// The native CLI's loop figures for a document (built by `make test-e2e`).
const cliLoop = (text) => cli('analyze', text).loop;

// How many pixels of each canvas of the panel are in the first series colour (the
// curves, the Nyquist locus, the decaying poles): an axes-only canvas has none.
const curvePixels = (page) => page.evaluate(() => {
  const hex = getComputedStyle(document.documentElement).getPropertyValue('--plot-1').trim();
  const want = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16));
  return [...document.querySelectorAll('#panel-loop canvas')].map((c) => {
    const { data } = c.getContext('2d').getImageData(0, 0, c.width, c.height);
    let n = 0;
    for (let i = 0; i < data.length; i += 4) {
      if (data[i + 3] > 200 && Math.abs(data[i] - want[0]) + Math.abs(data[i + 1] - want[1]) + Math.abs(data[i + 2] - want[2]) < 30) n++;
    }
    return n;
  });
});

test('the demo loop is stable, every plot is drawn, and no error is logged', async () => {
  const { page, seen } = await openPanel(browser.context, 'loop');
  assert.match(await verdict(page), /^Stable/);
  assert.equal(await page.locator('#panel-loop .verdict').getAttribute('data-kind'), 'stable');
  assert.match(await page.locator('#panel-loop .verdict-mu').textContent(), /^μ > 1 at every frequency/);
  assert.equal(await page.locator('#panel-loop .verdict .warning').isVisible(), false, 'no open-loop warning for the demo');
  // Loop gain, phase, Nyquist, poles, step and μ: six plots, each with a note under it.
  assert.equal(await page.locator('#panel-loop .plot-cell').count(), 6);
  assert.equal(await page.locator('#panel-loop .plot-cell .plot-note').count(), 6);
  const boxes = await page.locator('#panel-loop canvas').evaluateAll((cs) => cs.map((c) => c.getBoundingClientRect()).map((b) => [b.width, b.height]));
  assert.ok(boxes.length >= 6, `${boxes.length} canvases`);
  for (const [w, h] of boxes) assert.ok(w > 100 && h > 100, `a canvas of ${w}×${h}`);
  const drawn = await curvePixels(page);
  assert.ok(drawn.every((n) => n > 50), `curve pixels per canvas: ${drawn}`);
  // Nothing on the panel reads NaN or undefined.
  assert.doesNotMatch(await page.locator('#panel-loop').textContent(), /NaN|undefined|Infinity/);
  assert.match(await page.locator('#panel-loop .card').filter({ hasText: 'Compensation' }).textContent(), /already meets the wanted 60° phase margin/);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('the buffered part oscillates; the r_fb fix applies, and undo brings the oscillation back', async () => {
  const { page, seen } = await openPanel(browser.context, 'part');
  await page.getByLabel('Preset (illustrative, not a datasheet)').selectOption('buffered-5v');
  await page.getByRole('button', { name: 'Load preset' }).click();
  await page.locator('#rail a[href="#loop"]').click();
  await page.waitForSelector('#panel-loop[data-computed]');
  const oscillating = await verdict(page);
  const f = oscillating.match(/^Oscillates at about (\d+(?:\.\d+)?) MHz$/);
  assert.ok(f, oscillating);
  assert.ok(Number(f[1]) >= 70 && Number(f[1]) <= 75, `oscillates at ${f[1]} MHz`);
  assert.equal(await page.locator('#panel-loop .verdict').getAttribute('data-kind'), 'oscillates');
  const row = page.locator('#panel-loop table.helper tr[data-key="r_fb_ohm"]');
  assert.match(await row.textContent(), /91k/);
  assert.match(await row.textContent(), /-47\.\d° → 6\d\.\d°/, 'the phase margin before and after');
  // The knobs with nothing in range say so and offer nothing to apply.
  assert.match(await page.locator('#panel-loop table.helper tr[data-key="c_fb_f"]').textContent(), /none in range/);
  assert.equal(await page.locator('#panel-loop table.helper tr[data-key="c_fb_f"] button').count(), 0);
  const before = await rfb(page);
  assert.equal(before, '2k2');

  let n = await count(page);
  await row.getByRole('button', { name: /^Apply/ }).click();
  await recomputed(page, n);
  const applied = await rfb(page);
  assert.equal(await page.evaluate((t) => wasm_bindgen.parseValue(t, 'Ω', 'x').value, applied), 91000, `r_fb is now ${applied}`);
  assert.match(await verdict(page), /^Stable: 6\d° phase margin$/);
  assert.match(await page.locator('#panel-loop .card').filter({ hasText: 'Compensation' }).textContent(), /already meets the wanted 60°/);

  n = await count(page);
  await undoButton(page).click();
  await recomputed(page, n);
  assert.equal(await rfb(page), before);
  assert.match(await verdict(page), /^Oscillates at about 7\d MHz$/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('the buffered loop figures agree with the native CLI', async () => {
  const { page } = await openPanel(browser.context, 'loop');
  const n = await count(page);
  const text = await page.evaluate(() => {
    HR.design.replace('part', wasm_bindgen.presets().find((p) => p.id === 'buffered-5v').part, 'buffered');
    return HR.design.text();
  });
  await recomputed(page, n);
  const loop = cliLoop(text);
  assert.equal(loop.stable, false);
  assert.equal(await figure(page, 'pm'), `${loop.phase_margin_deg.toFixed(1)}°`);
  assert.ok((await figure(page, 't_mid')).startsWith(`${loop.t_mid_db.toFixed(2)} dB`));
  assert.ok((await figure(page, 'gm')).startsWith(`${loop.gain_margin_db.toFixed(2)} dB at `));
  assert.equal(await figure(page, 'mu_min'), loop.mu_min.toFixed(3));
  assert.equal(await figure(page, 'crossover'), `${(loop.crossover_hz / 1e6).toPrecision(3)} MHz`);
  await page.close();
});

test('a bad value elsewhere is reported here by its field, and the last figures stay', async () => {
  const { page } = await openPanel(browser.context, 'loop');
  const before = await figure(page, 't_mid');
  await page.evaluate(() => HR.design.set('part', 'cgs_f', '4 uH', 'test'));
  await page.waitForFunction(() => !document.querySelector('#panel-loop p.error').hidden);
  assert.match(await page.locator('#panel-loop p.error').textContent(), /^Cgs: /);
  assert.equal(await page.locator('#panel-loop .stale-note').isVisible(), true);
  assert.equal(await figure(page, 't_mid'), before);
  assert.doesNotMatch(await page.locator('#panel-loop').textContent(), /NaN|undefined/);
  await page.close();
});
