// The health line in Chromium from file://: on every panel, the core's findings in
// its words (the same as `halfrail analyze` prints in its `health` section), each
// linking to the panel that explains it; a three-inverter part oscillates, which
// every panel says and which voids Stage's and Response's small-signal figures; undo
// brings the demo's finding back; a healthy design has none; the line keeps pace
// with the panels and keeps its last report, marked, while the draft is bad.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, clearStorage, openPanel, cli, undoButton } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

// What the line shows: [{code, severity, topic, text, link}] and its state.
const line = (page) => page.evaluate(() => {
  const node = document.getElementById('health');
  return {
    state: node.dataset.state,
    stale: node.classList.contains('stale'),
    quiet: node.querySelector('.quiet') ? node.querySelector('.quiet').textContent : null,
    findings: [...node.querySelectorAll('li')].map((li) => ({
      code: li.dataset.code, severity: li.dataset.severity, topic: li.dataset.topic,
      text: li.querySelector('.text').textContent, link: li.querySelector('a') && li.querySelector('a').textContent,
    })),
  };
});
// The CLI's health section for the page's draft, in the line's terms.
const expected = async (page) => {
  const health = cli('analyze', await page.evaluate(() => HR.design.text())).health;
  const LINK = { bias: 'Part panel', loop: 'Loop panel', gain: 'Stage panel' };
  return { void: health.void, findings: health.findings.map((f) => ({ ...f, link: LINK[f.topic] })) };
};
const computed = (page) => page.locator('#health').getAttribute('data-computed').then(Number);
const recomputed = (page, n) => page.waitForFunction((m) => Number(document.getElementById('health').dataset.computed) > m, n);

// Shows each panel of the rail in turn (by its link, as a user does) and reads the
// line there: it is on show, above the panel.
async function everyPanel(page) {
  const seen = {};
  for (const id of await page.locator('#rail a').evaluateAll((as) => as.map((a) => a.dataset.panel))) {
    await page.locator(`#rail a[data-panel="${id}"]`).click();
    await page.waitForSelector(`#panel-${id}:not([hidden])`);
    assert.equal(await page.locator('#health').isVisible(), true, `the line on ${id}`);
    const [lineBox, panel] = [await page.locator('#health').boundingBox(), await page.locator(`#panel-${id}`).boundingBox()];
    assert.ok(lineBox.y + lineBox.height <= panel.y, `the line above the ${id} panel`);
    seen[id] = await line(page);
  }
  return seen;
}

test('the demo: its one finding, the part sets the gain, on every panel as the CLI says it, linking to Stage', async () => {
  const { page, seen } = await openPanel(browser.context, 'part');
  await page.waitForSelector('#health[data-computed]');
  const want = await expected(page);
  assert.equal(want.void, false);
  assert.deepEqual(want.findings.map((f) => f.code), ['part-sets-gain']);
  const panels = await everyPanel(page);
  assert.ok(Object.keys(panels).length >= 8, Object.keys(panels).join());
  for (const [id, got] of Object.entries(panels)) {
    assert.deepEqual(got, { state: 'caution', stale: false, quiet: null, findings: want.findings }, id);
  }
  // Its link opens the Stage panel, whose figures are plain numbers.
  await page.locator('#rail a[data-panel="part"]').click();
  await page.locator('#health').getByRole('link', { name: 'Stage panel' }).click();
  await page.waitForSelector('#panel-stage:not([hidden])[data-computed]');
  assert.equal(await page.locator('#rail a[aria-current="page"]').getAttribute('data-panel'), 'stage');
  assert.equal(await page.locator('#panel-stage dd[data-key="gain"]').getAttribute('data-void'), null);
  assert.equal(await page.locator('#panel-stage .void-note').isVisible(), false);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('three inverters typed into Part: every panel says the loop oscillates, the link opens Loop, the small-signal figures are void; undo brings the demo back', async () => {
  const { page, seen } = await openPanel(browser.context, 'part');
  await page.waitForSelector('#health[data-computed]');
  const demo = await line(page);
  await page.getByLabel('Stages', { exact: true }).first().fill('3');
  await page.waitForSelector('#health[data-follow="settled"][data-state="void"]');
  const want = await expected(page);
  assert.equal(want.void, true);
  assert.equal(want.findings[0].code, 'oscillates');
  assert.match(want.findings[0].text, /oscillates.* at about \d+(\.\d+)? MHz/);
  for (const [id, got] of Object.entries(await everyPanel(page))) {
    assert.deepEqual(got, { state: 'void', stale: false, quiet: null, findings: want.findings }, id);
  }
  // Stage's small-signal figures are struck through under a note; its bias figures are not.
  await page.locator('#rail a[data-panel="stage"]').click();
  await page.waitForSelector('#panel-stage:not([hidden])');
  const gain = page.locator('#panel-stage dd[data-key="gain"]');
  assert.equal(await gain.getAttribute('data-void'), 'true');
  assert.match(await gain.evaluate((n) => getComputedStyle(n).textDecorationLine), /line-through/);
  assert.equal(await page.locator('#panel-stage dd[data-key="iq"]').getAttribute('data-void'), null);
  assert.equal(await page.locator('#panel-stage .void-note').isVisible(), true);
  assert.match(await page.locator('#panel-stage .void-note').textContent(), /health line/);
  // Response's too.
  await page.locator('#rail a[data-panel="response"]').click();
  await page.waitForSelector('#panel-response:not([hidden])[data-computed]');
  assert.equal(await page.locator('#panel-response dd[data-key="gt"]').getAttribute('data-void'), 'true');
  assert.equal(await page.locator('#panel-response .void-note').isVisible(), true);
  // The finding's link opens the Loop panel, which says the same.
  await page.locator('#health').getByRole('link', { name: 'Loop panel' }).click();
  await page.waitForSelector('#panel-loop:not([hidden])[data-computed]');
  assert.equal(await page.locator('#rail a[aria-current="page"]').getAttribute('data-panel'), 'loop');
  assert.match(await page.locator('#panel-loop .verdict-head').textContent(), /^Oscillates/);
  // Undo: the demo's finding again, and Stage's figures plain.
  const n = await computed(page);
  await undoButton(page).click();
  await recomputed(page, n);
  assert.deepEqual(await line(page), demo);
  await page.locator('#rail a[data-panel="stage"]').click();
  await page.waitForSelector('#panel-stage:not([hidden])');
  assert.equal(await gain.getAttribute('data-void'), null);
  assert.equal(await page.locator('#panel-stage .void-note').isVisible(), false);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('a healthy design: no findings, said quietly; a bad value keeps the last report, marked, until it is undone', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  await page.waitForSelector('#health[data-computed]');
  for (const [key, value] of [['r_in_ohm', '1k'], ['r_fb_ohm', '100']]) {
    await page.locator(`#panel-stage button.value[data-key="${key}"]`).click();
    await page.locator('#panel-stage input.in-place').fill(value);
    await page.keyboard.press('Enter');
  }
  await page.waitForSelector('#health[data-follow="settled"][data-state="clear"]');
  assert.deepEqual((await expected(page)).findings, []);
  const healthy = await line(page);
  assert.deepEqual(healthy, { state: 'clear', stale: false, quiet: 'No findings.', findings: [] });
  assert.equal(await page.locator('#health').getByRole('link').count(), 0);
  // A bad value: the panels say what is wrong; the line keeps the last design's report, marked stale.
  // (R in: an edit of another field than the last is a step of undo of its own.)
  await page.locator('#panel-stage button.value[data-key="r_in_ohm"]').click();
  await page.locator('#panel-stage input.in-place').fill('-1k');
  await page.keyboard.press('Enter');
  await page.waitForSelector('#health.stale');
  assert.deepEqual(await line(page), { ...healthy, stale: true });
  await undoButton(page).click();
  await page.waitForSelector('#health[data-follow="settled"]:not(.stale)');
  assert.deepEqual(await line(page), healthy);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('the line keeps pace: each edit gives one report, for that edit, as Stage gives its figures', async () => {
  const { page } = await openPanel(browser.context, 'stage');
  await page.waitForSelector('#health[data-computed]');
  const lags = await page.evaluate(async () => {
    const stage = document.getElementById('panel-stage');
    const health = document.getElementById('health');
    const out = [];
    for (const stages of ['3', '1', '3', '1']) {
      const [s, h] = [Number(stage.dataset.computed), Number(health.dataset.computed)];
      HR.design.set('part', 'stages', stages, 'test');
      // Both in, each from its own worker: the Stage figures and the line's report.
      await new Promise((done) => {
        const poll = () => (Number(stage.dataset.computed) > s && Number(health.dataset.computed) > h && health.dataset.follow === 'settled'
          ? done() : requestAnimationFrame(poll));
        poll();
      });
      out.push([Number(health.dataset.computed) - h, health.dataset.state]);
    }
    return out;
  });
  assert.deepEqual(lags, [[1, 'void'], [1, 'caution'], [1, 'void'], [1, 'caution']]);
  await page.close();
});

test('the line and the Brief figures are computed in workers, never on the page\'s thread; the line keeps one worker across edits', async () => {
  const { page, seen } = await openPanel(browser.context, 'brief');
  await page.waitForSelector('#health[data-computed]');
  await page.waitForSelector('#panel-brief[data-computed]');
  // Every core call the page's own thread makes from here on.
  await page.evaluate(() => {
    const direct = HR.call;
    window.__mainCalls = [];
    HR.call = (name, ...args) => { window.__mainCalls.push(name); return direct(name, ...args); };
  });
  const [line0, brief0] = [await computed(page), Number(await page.locator('#panel-brief').getAttribute('data-computed'))];
  await page.locator('#rail a[data-panel="stage"]').click();
  for (const value of ['3k3', '4k7', '5k6']) {
    await page.locator('#panel-stage button.value[data-key="r_fb_ohm"]').click();
    await page.locator('#panel-stage input.in-place').fill(value);
    await page.keyboard.press('Enter');
    await page.waitForSelector('#panel-stage input.in-place', { state: 'detached' });
  }
  await recomputed(page, line0);
  // Stage computes its own figures (responseReport too) on this thread for a quick
  // design: the Brief's are counted from when it is shown again.
  const lineCalls = await page.evaluate(() => window.__mainCalls.splice(0));
  await page.locator('#rail a[data-panel="brief"]').click();
  await page.waitForFunction((n) => Number(document.getElementById('panel-brief').dataset.computed) > n, brief0);
  await page.waitForSelector('#health[data-follow="settled"]');
  const calls = await page.evaluate(() => window.__mainCalls);
  assert.ok(!lineCalls.includes('health') && !calls.includes('health') && !calls.includes('responseReport'), [...lineCalls, '|', ...calls].join());
  assert.equal(await page.evaluate(() => HR.background.startedIn.health), 1, 'one worker for the line');
  assert.ok(await page.evaluate(() => HR.background.startedIn.brief) >= 1, 'the Brief figures in a worker');
  assert.deepEqual(await line(page), { state: 'caution', stale: false, quiet: null, findings: (await expected(page)).findings.map(({ code, severity, topic, text, link }) => ({ code, severity, topic, text, link })) });
  assert.deepEqual(seen.errors, []);
  await page.close();
});
