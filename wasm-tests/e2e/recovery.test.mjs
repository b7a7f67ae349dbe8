// A trap in the wasm core (a bug: a panic) on the page's main thread: the status line
// says so, the design is kept, and a fresh instance of the module answers the next
// call, so the panels go on computing without a reload.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, clearStorage, openPanel } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

test('a trap is reported, the design kept and the module restarted', async () => {
  const { page, seen } = await openPanel(browser.context, 'response');
  const before = await page.evaluate(() => ({ text: HR.design.text(), computed: Number(document.getElementById('panel-response').dataset.computed) }));
  const trapped = await page.evaluate(() => HR.call('trapForTest'));
  assert.equal(trapped.error.field, '');
  assert.match(trapped.error.reason, /engine failed .*Your inputs are kept; the engine was restarted/);
  assert.match(await page.locator('#engine-status').textContent(), /restarted/);
  assert.ok(await page.locator('#engine-status.problem').count());
  // The design is the same, and the fresh module computes: a value formats, and an
  // edit of the design redraws the Response panel.
  assert.equal(await page.evaluate(() => HR.design.text()), before.text);
  assert.equal(await page.evaluate(() => HR.restarts), 1);
  assert.equal((await page.evaluate(() => HR.call('formatValue', 4700, 'Ω', 2))).ok, '4.7 kΩ');
  await page.evaluate(() => HR.design.set('stage', 'r_fb_ohm', '2k7', 'test'));
  await page.waitForFunction((n) => Number(document.getElementById('panel-response').dataset.computed) > n, before.computed);
  // A second trap restarts it again.
  await page.evaluate(() => HR.call('trapForTest'));
  assert.equal(await page.evaluate(() => HR.restarts), 2);
  assert.equal((await page.evaluate(() => HR.call('formatValue', 100e-9, 'F', 2))).ok, '100 nF');
  // The only errors are the two panics' own reports (console_error_panic_hook).
  assert.deepEqual(seen.errors.filter((e) => !/trapForTest|unreachable/.test(e)), []);
  assert.deepEqual(seen.requests, []);
});
