// The Stage panel in Chromium from file://: values edited in place on the
// schematic (mouse and keyboard), undo and redo, and a bad value refused at its
// component with the last figures kept.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, clearStorage, openPanel, undoButton, redoButton } from './browser.mjs';

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
