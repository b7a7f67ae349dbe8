// The page in a window 800 px wide, in Chromium from file://: the Stage panel's
// schematic is drawn to the card's width — whole, not cut at the right, its values
// still edited in place — and at full size again in a wide window; a table wider than
// its card says that it scrolls (a shadow at the edge with more beyond it, which moves
// to the other edge once scrolled there), and a table that fits says nothing.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, watch, ready, clearStorage, PAGE_URL, framesDrawn } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

async function openNarrow(id) {
  const page = await browser.context.newPage();
  const seen = watch(page);
  await page.setViewportSize({ width: 800, height: 900 });
  await page.goto(`${PAGE_URL}#${id}`);
  await ready(page);
  await page.waitForSelector(`#panel-${id}[data-computed]`);
  return { page, seen };
}

// The schematic's frame (its card's scroll box), the drawing and every value on it:
// their boxes in CSS px, and whether the frame scrolls.
const schematicBoxes = (page) => page.evaluate(() => {
  const drawing = document.querySelector('#panel-stage .schematic');
  const frame = drawing.parentElement;
  const box = (n) => { const r = n.getBoundingClientRect(); return { left: r.left, right: r.right, top: r.top, bottom: r.bottom, width: r.width }; };
  return {
    frame: box(frame), drawing: box(drawing), canvas: box(drawing.querySelector('canvas')),
    scrolls: frame.scrollWidth > frame.clientWidth + 1, more: frame.dataset.more || '',
    values: [...drawing.querySelectorAll('button.value')].map((b) => ({ key: b.dataset.key, ...box(b) })),
  };
});

test('800 px: the schematic is drawn whole to the card’s width, and its values are still edited in place', async () => {
  const { page, seen } = await openNarrow('stage');
  const s = await schematicBoxes(page);
  assert.equal(s.scrolls, false, 'the schematic does not scroll');
  assert.equal(s.more, '', 'and says nothing of scrolling');
  assert.ok(s.canvas.right <= s.frame.right + 0.5, `the drawing ends at ${s.canvas.right}, inside its card (${s.frame.right})`);
  assert.ok(s.canvas.width < 1040 && s.canvas.width > 0.9 * s.frame.width, `drawn ${s.canvas.width} px wide in ${s.frame.width} px`);
  for (const v of s.values) {
    assert.ok(v.left >= s.frame.left - 0.5 && v.right <= s.frame.right + 0.5, `${v.key}'s value shows whole (${v.left}…${v.right})`);
  }
  // The load's value, at the far right, is edited as in a wide window.
  const load = page.locator('#panel-stage button.value[data-key="load_ohm"]');
  assert.match(await load.textContent(), /1k/);
  const n = Number(await page.locator('#panel-stage').getAttribute('data-computed'));
  await load.click();
  await page.locator('#panel-stage input.in-place').fill('2k2');
  await page.keyboard.press('Enter');
  await page.waitForFunction((m) => Number(document.getElementById('panel-stage').dataset.computed) > m, n);
  assert.match(await load.textContent(), /2k2/);
  assert.equal(await page.evaluate(() => HR.design.get('stage', 'load_ohm')), '2k2');

  // A wide window: the drawing at its full size again.
  await page.setViewportSize({ width: 1400, height: 900 });
  await page.waitForFunction(() => document.querySelector('#panel-stage .schematic').dataset.scale === '1');
  const wide = await schematicBoxes(page);
  assert.equal(wide.canvas.width, 1040);
  assert.equal(wide.scrolls, false);
  assert.equal(wide.more, '');
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('800 px: a wide table shows that it scrolls, at the edge with more beyond it', async () => {
  const { page, seen } = await openNarrow('chain');
  const box = page.locator('#panel-chain .scroll').filter({ has: page.locator('table.chain-blocks') });
  const state = () => box.evaluate((b) => ({
    scrolls: b.scrollWidth > b.clientWidth, overflow: getComputedStyle(b).overflowX,
    more: b.dataset.more || '', shadow: getComputedStyle(b).boxShadow,
  }));
  const first = await state();
  assert.equal(first.scrolls, true, 'the blocks table is wider than its card at 800 px');
  assert.equal(first.overflow, 'auto');
  assert.equal(first.more, 'right', 'more to the right');
  assert.notEqual(first.shadow, 'none', 'a shadow at the right edge shows it');
  // Scrolled to the end, as a user would (the wheel, sideways): the cue moves to the left.
  await box.hover();
  for (let k = 0; k < 20 && (await state()).more !== 'left'; k++) {
    await page.mouse.wheel(400, 0);
    await framesDrawn(page);
  }
  const end = await state();
  assert.equal(end.more, 'left', 'at the end, more to the left only');
  assert.notEqual(end.shadow, 'none');
  // The figures after each block: the same cue.
  const after = page.locator('#panel-chain .scroll').filter({ has: page.locator('table.chain-after') });
  assert.equal(await after.getAttribute('data-more'), 'right');

  // In a wide window a table that fits (the Response panel's noise shares) says nothing.
  await page.setViewportSize({ width: 1400, height: 900 });
  await page.locator('#rail a[href="#response"]').click();
  await page.waitForSelector('#panel-response[data-computed]');
  const fits = page.locator('#panel-response .scroll').first();
  await page.waitForFunction(() => { const b = document.querySelector('#panel-response .scroll'); return b.offsetWidth > 0 && b.scrollWidth <= b.clientWidth; });
  await framesDrawn(page);
  assert.equal(await fits.getAttribute('data-more'), null, 'a table that fits has no cue');
  assert.equal(await fits.evaluate((b) => getComputedStyle(b).boxShadow), 'none');
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});
