// The Stage panel in Chromium from file://: values edited in place on the
// schematic (mouse and keyboard), undo and redo, and a bad value refused at its
// component with the last figures kept.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, clearStorage, openPanel, undoButton, redoButton, cli } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const figure = (page, key) => page.locator(`#panel-stage dd[data-key="${key}"]`).textContent();
const count = (page) => page.locator('#panel-stage').getAttribute('data-computed').then(Number);
const recomputed = (page, n) => page.waitForFunction((m) => Number(document.getElementById('panel-stage').dataset.computed) > m, n);
const value = (page, key) => page.locator(`#panel-stage button.value[data-key="${key}"]`);

test('edit a value in place, then undo and redo it', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  assert.match(await value(page, 'r_fb_ohm').textContent(), /R fb2k2 · E3/);
  const before = await figure(page, 'gain');
  let n = await count(page);
  await value(page, 'r_fb_ohm').click();
  await page.locator('#panel-stage input.in-place').fill('4k7');
  await page.keyboard.press('Enter');
  await recomputed(page, n);
  assert.match(await value(page, 'r_fb_ohm').textContent(), /4k7 · E3/);
  assert.notEqual(await figure(page, 'gain'), before, 'more feedback resistance, more gain');
  n = await count(page);
  await undoButton(page).click();
  await recomputed(page, n);
  assert.equal(await figure(page, 'gain'), before);
  n = await count(page);
  await redoButton(page).click();
  await recomputed(page, n);
  assert.match(await value(page, 'r_fb_ohm').textContent(), /4k7/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('one Undo and Redo for the whole page: Ctrl+Z and Ctrl+Y on any panel, each step named', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  assert.equal(await undoButton(page).isDisabled(), true, 'nothing to undo at first');
  let n = await count(page);
  await value(page, 'r_fb_ohm').click();
  await page.locator('#panel-stage input.in-place').fill('4k7');
  await page.keyboard.press('Enter');
  await recomputed(page, n);
  assert.match(await undoButton(page).getAttribute('title'), /^Undo: .+ \(Ctrl\+Z\)$/);
  // On another panel, with the focus on the page (not in a field), the keys act on the design.
  const computedBefore = await count(page);
  await page.locator('#rail a[href="#chain"]').click();
  await page.locator('#panel-chain').waitFor();
  await page.locator('body').click({ position: { x: 5, y: 5 } });
  await page.keyboard.press('Control+z');
  await page.waitForFunction(() => HR.design.get('stage', 'r_fb_ohm') === '2k2');
  assert.equal(await redoButton(page).isDisabled(), false);
  await page.keyboard.press('Control+y');
  await page.waitForFunction(() => HR.design.get('stage', 'r_fb_ohm') === '4k7');
  // In a text field the keys are the field's own.
  const field = page.locator('#panel-chain').getByLabel('Input level', { exact: true });
  await field.focus();
  await page.keyboard.press('Control+z');
  assert.equal(await page.evaluate(() => HR.design.get('stage', 'r_fb_ohm')), '4k7');
  // Hidden, Stage computed nothing for the two steps; shown again, it computes once.
  assert.equal(await count(page), computedBefore);
  await page.locator('#rail a[href="#stage"]').click();
  await recomputed(page, computedBefore);
  assert.equal(await count(page), computedBefore + 1);
  // No panel has Undo or Redo of its own.
  assert.equal(await page.locator('#main').getByRole('button', { name: /^(Undo|Redo)/ }).count(), 0);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('a component is reached from the keyboard, and a bad value is refused at it', async () => {
  const { page } = await openPanel(browser.context, 'stage');
  const before = await figure(page, 'nf');
  await value(page, 'r_in_ohm').focus();
  await page.keyboard.press('Enter');
  const input = page.locator('#panel-stage input.in-place');
  await input.fill('220 uF');
  await input.press('Enter');
  await page.waitForFunction(() => document.querySelector('#panel-stage button.value[data-key="r_in_ohm"][aria-invalid="true"]'));
  assert.match(await page.locator('#panel-stage p.error').textContent(), /R in: `220 uF` is in F, expected Ω/);
  assert.equal(await figure(page, 'nf'), before, 'the last figures stay');
  // A component that is not fitted can be added.
  await page.getByRole('button', { name: 'C fb not fitted: add' }).click();
  await page.locator('#panel-stage input.in-place').fill('1p');
  await page.keyboard.press('Enter');
  await page.waitForSelector('#panel-stage button.value[data-key="c_fb_f"]:not(.ghost)');
  await page.close();
});

// A design the core calls quick (checkDocument's `quick`: a bound on the work, not a
// timing) has its figures computed on the page's thread at once, with no worker: in
// the DOM before the edit's task is over. A long sweep of nine inverters is not
// quick: its figures come from a worker, and a quick design afterwards computes here
// again. Both give what the CLI gives.
test('a quick design computes its figures at once on the page; a long sweep of nine inverters in a worker', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  const edit = (section, key, v) => page.evaluate(([s, k, v]) => {
    const panel = document.getElementById('panel-stage');
    const n = Number(panel.dataset.computed);
    HR.design.set(s, k, v, 'test');
    // The edit's microtasks have run by the next task: a quick run is over by then.
    return new Promise((resolve) => setTimeout(() => resolve({
      at: Number(panel.dataset.computed) - n, quick: HR.check(HR.design.text()).ok.quick, workers: HR.background.startedIn.stage || 0,
    }), 0));
  }, [section, key, v]);
  assert.deepEqual(await edit('stage', 'r_fb_ohm', '3k3'), { at: 1, quick: true, workers: 0 });
  assert.match(await figure(page, 'gain'), new RegExp(`^${cli('analyze', await page.evaluate(() => HR.design.text())).ac.gain_db.toFixed(2)} dB`));

  await edit('part', 'stages', 9);
  const slow = await edit('analysis', 'points_per_decade', 1000);
  assert.equal(slow.quick, false);
  await page.waitForSelector('#panel-stage[data-follow="settled"]', { state: 'attached' });
  assert.equal(await page.evaluate(() => HR.background.startedIn.stage), 1, 'the long sweep in a worker');
  assert.match(await figure(page, 'gain'), new RegExp(`^${cli('analyze', await page.evaluate(() => HR.design.text())).ac.gain_db.toFixed(2)} dB`));

  const back = await edit('analysis', 'points_per_decade', 50);
  assert.deepEqual(back, { at: 1, quick: true, workers: 1 }, 'quick again: computed here at once');
  assert.deepEqual(seen.errors, []);
  await page.close();
});
