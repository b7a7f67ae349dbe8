// The first-use guide, in Chromium from file://, as a new user meets it: on a first
// visit a "Start here" box sits above the panels, covering no control; Next walks the
// steps — part, target, design, loop and swing — each showing its panel, and each
// step's link leads to its panel (the target's gain field and the Design button get
// the focus); Close hides it, and a reload remembers that; "Start here" at the foot of
// the page brings it back. Where the browser refuses storage the page still works and
// the guide still closes. An embedded page does not show it. No network request.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, watch, ready, clearStorage, PAGE_URL } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const guide = (page) => page.locator('#guide');
const shownPanel = (page) => page.evaluate(() => document.getElementById('main').dataset.shown);
const focusedLabel = (page) => page.evaluate(() => {
  const a = document.activeElement;
  return a && a.labels && a.labels[0] ? a.labels[0].textContent.trim() : a ? a.textContent.trim() : '';
});

async function open(hash = '') {
  const page = await browser.context.newPage();
  const seen = watch(page);
  await page.goto(`${PAGE_URL}${hash}`);
  await ready(page);
  return { page, seen };
}

// Whether the control at the middle of `locator` is what a click there would hit.
const onTop = (locator) => locator.evaluate((el) => {
  el.scrollIntoView({ block: 'center' });
  const r = el.getBoundingClientRect();
  const hit = document.elementFromPoint(r.left + r.width / 2, r.top + r.height / 2);
  return hit === el || el.contains(hit);
});

test('a first visit shows the guide; Next walks part, target, design, loop and swing, each link leading to its panel', async () => {
  // On the Part panel, whose controls the guide must not cover (shown, before they are looked for).
  const { page, seen } = await open('#part');
  await page.waitForSelector('#panel-part:not([hidden]) select');
  await assert.doesNotReject(guide(page).waitFor({ state: 'visible' }));
  assert.match(await guide(page).textContent(), /Start here\s*step 1 of 4/);
  assert.deepEqual(await guide(page).locator('.guide-steps li').allTextContents(), ['Part', 'Target', 'Design', 'Loop and swing']);
  assert.match(await guide(page).locator('.guide-text').textContent(), /demo/);
  assert.equal(await guide(page).getByRole('button', { name: 'Back' }).isDisabled(), true);
  // It covers nothing: the Design bar, the rail and the panel's own controls take clicks.
  for (const control of [page.locator('#docbar').getByRole('button', { name: 'Save' }), page.locator('#rail a[href="#stage"]'),
    page.locator('#panel-part select').first()]) {
    assert.ok(await onTop(control), 'the control is not covered');
  }
  assert.equal(await guide(page).evaluate((el) => getComputedStyle(el).position), 'static');

  // Step 1's link: the Part panel.
  await page.locator('#rail a[href="#bench"]').click();
  await guide(page).getByRole('link', { name: 'Open the Part panel' }).click();
  assert.equal(await shownPanel(page), 'part');

  // Next: the target, on the Stage panel; its link gives the gain field the focus.
  await guide(page).getByRole('button', { name: 'Next' }).click();
  assert.match(await guide(page).textContent(), /step 2 of 4/);
  assert.equal(await shownPanel(page), 'stage');
  assert.equal(await page.evaluate(() => document.activeElement.textContent), 'Next', 'the focus stays on Next');
  await guide(page).getByRole('link', { name: 'Go to the target gain' }).click();
  assert.equal(await focusedLabel(page), await page.evaluate(() => HR.field('target', 'gain_db').label));
  assert.equal(await page.evaluate(() => document.activeElement.value), '12', 'the demo’s target, 12 dB');

  // The design: its link gives the Design button the focus, and pressing it designs.
  await guide(page).getByRole('button', { name: 'Next' }).click();
  assert.match(await guide(page).textContent(), /step 3 of 4/);
  await guide(page).getByRole('link', { name: 'Go to the Design button' }).click();
  assert.equal(await focusedLabel(page), 'Design');
  await page.keyboard.press('Enter');
  await page.waitForSelector('#panel-stage[data-designed]');
  assert.match(await page.locator('#panel-stage .design-best').textContent(), /^Best E24 pair: R in /);

  // The check: the Loop and the Swing panels, each by its link.
  await guide(page).getByRole('button', { name: 'Next' }).click();
  assert.match(await guide(page).textContent(), /step 4 of 4/);
  assert.equal(await shownPanel(page), 'loop');
  await guide(page).getByRole('link', { name: 'Open the Swing panel' }).click();
  assert.equal(await shownPanel(page), 'swing');
  await guide(page).getByRole('link', { name: 'Open the Loop panel' }).click();
  assert.equal(await shownPanel(page), 'loop');
  // Back returns a step; the last step's button is Done, which closes the guide.
  await guide(page).getByRole('button', { name: 'Back' }).click();
  assert.match(await guide(page).textContent(), /step 3 of 4/);
  await guide(page).getByRole('button', { name: 'Next' }).click();
  await guide(page).getByRole('button', { name: 'Done' }).click();
  await guide(page).waitFor({ state: 'hidden' });
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('closed is remembered across a reload; Start here at the foot of the page brings the guide back', async () => {
  const { page, seen } = await open('#stage');
  await guide(page).waitFor({ state: 'visible' });
  await guide(page).getByRole('button', { name: 'Close the guide' }).click();
  await guide(page).waitFor({ state: 'hidden' });
  await page.reload();
  await ready(page);
  assert.equal(await guide(page).isHidden(), true, 'not shown again after a reload');
  await page.locator('.cautions').getByRole('button', { name: 'Start here: a short guide' }).click();
  await guide(page).waitFor({ state: 'visible' });
  assert.match(await guide(page).textContent(), /step 1 of 4/);
  assert.equal(await page.evaluate(() => document.activeElement.id), 'guide', 'the guide has the focus');
  // Opened again, it shows after a reload too, until closed.
  await page.reload();
  await ready(page);
  assert.equal(await guide(page).isVisible(), true);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('where the browser refuses storage the guide still shows and closes, and the page works', async () => {
  const page = await browser.context.newPage();
  const seen = watch(page);
  // Storage that throws on every use, as a locked-down browser's does.
  await page.addInitScript(() => {
    Object.defineProperty(window, 'localStorage', { configurable: true, get() { throw new DOMException('The operation is insecure.', 'SecurityError'); } });
  });
  await page.goto(`${PAGE_URL}#part`);
  await ready(page);
  assert.equal(await page.evaluate(() => { try { return !window.localStorage; } catch (e) { return true; } }), true, 'storage is refused');
  await guide(page).waitFor({ state: 'visible' });
  await guide(page).getByRole('button', { name: 'Next' }).click();
  assert.match(await guide(page).textContent(), /step 2 of 4/);
  await guide(page).getByRole('button', { name: 'Close the guide' }).click();
  await guide(page).waitFor({ state: 'hidden' });
  // The page goes on: the Stage panel computes its figures.
  await page.locator('#rail a[href="#stage"]').click();
  await page.waitForSelector('#panel-stage[data-computed]');
  assert.match(await page.locator('#panel-stage dd[data-key="gain"]').textContent(), /dB/);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('an embedded page does not show the guide by itself', async () => {
  const { page, seen } = await open('#part&embed');
  assert.equal(await guide(page).isHidden(), true);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
