// The Crystal panel's tools from a user's side, in Chromium from file://: the design
// helper's ranked choices equal `halfrail crystal --design` on the same document, Use
// writes C1, C2 and Rs as one step and Ctrl+Z takes them back; limits nothing meets
// are said in words with the core's advice; the spread's yield and figures equal
// `halfrail crystal --spread`, and Cancel stops a run; a pinned reference is drawn
// under the plots and set beside the figures. Every wait is for a state.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, clearStorage, openPanel, cli, undoButton } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const panel = '#panel-crystal';
const designCard = `${panel} .crystal-design`;
const spreadCard = `${panel} .crystal-spread`;
const computed = (page) => page.locator(panel).getAttribute('data-computed').then(Number);
const recomputed = (page, n) => page.waitForFunction((m) => {
  const p = document.getElementById('panel-crystal');
  return Number(p.dataset.computed) > m && p.dataset.follow === 'settled';
}, n);
const field = (page, label) => page.locator(panel).getByLabel(label, { exact: true });
const designed = (page, n) => page.waitForFunction(([sel, m]) => {
  const c = document.querySelector(sel);
  return c.dataset.state === 'done' && Number(c.dataset.designed || 0) > m;
}, [designCard, n], { timeout: 60000 });
const designedCount = (page) => page.locator(designCard).evaluate((c) => Number(c.dataset.designed || 0));
// The page's own words for a value (the core's formatters).
const words = (page, fn, ...args) => page.evaluate(([f, a]) => new Function(`return (${f})`)()(...a), [fn.toString(), args]);

test('Design ranks choices as halfrail crystal --design; Use sets C1, C2 and Rs in one step, Ctrl+Z restores them', async () => {
  const { page, seen } = await openPanel(browser.context, 'crystal');
  await page.waitForSelector(`${panel}[data-follow="settled"]`);
  // Rs made different from what the helper will choose, so Use visibly changes it.
  let n = await computed(page);
  await field(page, 'Series resistor Rs').fill('1k');
  await recomputed(page, n);
  assert.equal(await page.locator(designCard).getAttribute('data-state'), 'idle', 'nothing is designed before asked');

  const d0 = await designedCount(page);
  await page.locator(designCard).getByRole('button', { name: 'Design', exact: true }).click();
  await designed(page, d0);
  const text = await page.evaluate(() => HR.design.text());
  const want = cli('crystal', text, '--design');
  assert.equal(want.met, true);
  const rows = page.locator(`${designCard} table.candidates tbody tr`);
  assert.equal(await rows.count(), want.candidates.length);
  assert.ok(want.candidates.length >= 2, 'ranked choices');
  // Each row: C1, C2, Rs, Rf as the page writes values, the frequency error and margin
  // through the core's formatter, whether it meets the limits.
  for (const [i, c] of want.candidates.entries()) {
    const cells = await rows.nth(i).locator('td').allTextContents();
    const expected = await words(page, (c) => [HR.rkm(c.c1_f, 'C'), HR.rkm(c.c2_f, 'C'), c.rs_ohm ? HR.rkm(c.rs_ohm, 'R') : 'none', HR.rkm(c.rf_ohm, 'R'),
      `${c.pull_ppm > 0 ? '+' : ''}${HR.fixed(c.pull_ppm, 2)} ppm`, HR.fixed(c.margin, 2)], c);
    assert.deepEqual(cells.slice(0, 6), expected, `row ${i + 1}`);
    assert.ok(cells[6].startsWith(await words(page, (w) => HR.fmt(w, 'W', 3), c.drive_w)), cells[6]);
    assert.equal(cells[7], c.meets ? 'yes' : 'no');
    assert.equal(Number(await rows.nth(i).getAttribute('data-pull')), c.pull_ppm, 'bit for bit');
  }
  const verdict = await page.locator(`${designCard} [data-key="verdict"]`).textContent();
  assert.match(verdict, /^The best choice meets a frequency error within ±10\.0 ppm, a start-up margin of 5\.0 or more and a drive level of at most 200 µW/);
  // Words for people: no document key anywhere in the card.
  const shown = await page.locator(designCard).innerText();
  for (const key of ['c1_f', 'rs_ohm', 'pull_ppm', 'drive_w', 'margin_min']) assert.ok(!shown.includes(key), `${key} shown`);

  // Use on the best choice: C1, C2 and Rs change together.
  const best = want.candidates[0];
  const [c1, c2, rs] = await words(page, (b) => [HR.rkm(b.c1_f, 'C'), HR.rkm(b.c2_f, 'C'), HR.rkm(b.rs_ohm, 'R')], best);
  assert.notEqual(c1, '15p');
  n = await computed(page);
  await rows.nth(0).getByRole('button', { name: /^Use C1/ }).click();
  await recomputed(page, n);
  assert.deepEqual([await field(page, 'C1 (gate side)').inputValue(), await field(page, 'C2 (output side)').inputValue(),
    await field(page, 'Series resistor Rs').inputValue()], [c1, c2, rs]);
  assert.equal(await page.evaluate(() => HR.design.section('oscillator').rs_ohm), rs);
  // Rf, already the helper's value, is left as typed.
  assert.equal(await page.evaluate(() => HR.design.section('oscillator').rf_ohm), '1M');
  // The panel's figures are the CLI's for the design as it now is.
  const after = cli('crystal', await page.evaluate(() => HR.design.text()));
  assert.equal(Number(await page.locator(`${panel} dd[data-key="f_osc"]`).getAttribute('data-value')), after.f_osc_hz);
  assert.match(await undoButton(page).getAttribute('title'), new RegExp(`^Undo: use C1 ${c1}, C2 ${c2}, Rs ${rs}`));
  // The helper's inputs did not change: the choices stay, not marked stale.
  assert.equal(await page.locator(designCard).getAttribute('data-state'), 'done');

  // Ctrl+Z (focus on the Use button, not a text field) takes all three back at once.
  n = await computed(page);
  await page.keyboard.press('Control+z');
  await recomputed(page, n);
  assert.deepEqual([await field(page, 'C1 (gate side)').inputValue(), await field(page, 'C2 (output side)').inputValue(),
    await field(page, 'Series resistor Rs').inputValue()], ['15p', '15p', '1k']);
  assert.match(await undoButton(page).getAttribute('title'), /^Undo: Series resistor Rs/);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('limits no choice meets: said plainly, with the core’s words on what would; Cancel stops a design', async () => {
  const { page } = await openPanel(browser.context, 'crystal');
  await page.waitForSelector(`${panel}[data-follow="settled"]`);
  const n = await computed(page);
  await field(page, 'Start-up margin wanted').fill('40');
  await recomputed(page, n);
  // Design pressed and Cancel pressed in the same task: the run is stopped for sure.
  const state = await page.locator(designCard).evaluate((c) => {
    [...c.querySelectorAll('button')].find((b) => b.textContent === 'Design').click();
    const running = !c.querySelector('.run').hidden;
    c.querySelector('.run button.cancel').click();
    return running;
  });
  assert.equal(state, true, 'the run box showed');
  await page.waitForSelector(`${designCard}[data-state="cancelled"]`);
  assert.equal(await page.locator(`${designCard} .run`).isHidden(), true);
  assert.equal(await page.locator(`${designCard} .design-out`).isHidden(), true, 'nothing designed');
  assert.match(await page.locator(`${designCard} p.error`).textContent(), /^Design cancelled/);

  const d0 = await designedCount(page);
  await page.locator(designCard).getByRole('button', { name: 'Design', exact: true }).click();
  await designed(page, d0);
  const want = cli('crystal', await page.evaluate(() => HR.design.text()), '--design');
  assert.equal(want.met, false);
  assert.match(await page.locator(`${designCard} [data-key="verdict"]`).textContent(), /^No choice meets a frequency error within ±10\.0 ppm, a start-up margin of 40\.0 or more/);
  const advice = await page.locator(`${designCard} ul.design-advice li`).allTextContents();
  assert.equal(advice.length, want.advice.length);
  assert.ok(advice[0].startsWith('What would: with the frequency within ±10 ppm the best start-up margin is'), advice[0]);
  assert.ok(advice[0].includes('a crystal with an ESR of at most'), advice[0]);
  const meets = await page.locator(`${designCard} table.candidates tbody tr`).evaluateAll((rs) => rs.map((r) => r.dataset.meets));
  assert.deepEqual(meets, want.candidates.map(() => 'false'));
  await page.close();
});

test('the spread: a yield and figures as halfrail crystal --spread; Cancel stops a run', async () => {
  const { page, seen } = await openPanel(browser.context, 'crystal');
  await page.waitForSelector(`${panel}[data-follow="settled"]`);
  assert.equal(await page.locator(spreadCard).getAttribute('data-computed'), null, 'not run before asked');
  await page.locator(spreadCard).getByRole('button', { name: 'Run the spread' }).click();
  await page.waitForSelector(`${spreadCard}[data-computed="1"][data-follow="settled"]`, { timeout: 120000 });
  const text = await page.evaluate(() => HR.design.text());
  const want = cli('crystal', text, '--spread');
  const head = await page.locator(`${spreadCard} [data-key="yield"]`).textContent();
  assert.equal(head, `Yield ${await words(page, (y) => HR.fixed(100 * y, 1), want.yield)} %`);
  assert.equal(Number(await page.locator(`${spreadCard} [data-key="yield"]`).getAttribute('data-value')), want.yield, 'bit for bit');
  const rows = page.locator(`${spreadCard} table tbody tr`);
  const means = await words(page, (w) => [`${w.pull_ppm.mean > 0 ? '+' : ''}${HR.fixed(w.pull_ppm.mean, 2)} ppm`, HR.fixed(w.margin.mean, 2), HR.fmt(w.drive_w.mean, 'W', 3)], want);
  for (const [i, mean] of means.entries()) assert.equal(await rows.nth(i).locator('td').nth(1).textContent(), mean);
  assert.equal(await rows.nth(2).locator('td').last().textContent(), String(want.drive_w.count));
  // The yield said as the product it is: the small-signal share of all trials, and
  // the drive share of the first trials that meet the small-signal limits.
  const said1 = await page.locator(`${spreadCard} .intro`).nth(1).textContent();
  assert.ok(said1.includes(`${await words(page, (y) => HR.fixed(100 * y, 1), want.yield_small_signal)} % of all ${want.trials} trials meet the frequency and margin limits`), said1);
  assert.ok(said1.includes(`of the ${want.drive_judged} of those that meet them, ${await words(page, (y) => HR.fixed(100 * y, 1), want.drive_pass)} % are within the drive limit`), said1);
  const said = await page.locator(spreadCard).innerText();
  for (const key of ['pull_ppm', 'drive_w', 'c1_f', 'vdd_v', 'kn_a_per_v2']) assert.ok(!said.includes(key), `${key} shown`);
  assert.match(said, /Drawn in each trial: C1 \(gate side\), C2 \(output side\), /);
  // Three histograms, each drawn.
  const ranges = await page.locator(`${spreadCard} figure.plot`).evaluateAll((fs) => fs.map((f) => f.dataset.xRange || ''));
  assert.equal(ranges.length, 3);
  for (const r of ranges) assert.match(r, /^[\d.e+-]+ [\d.e+-]+$/);

  // An edit runs it again; Cancel in the frame its bar shows stops it, and the last
  // figures stay, marked as for an earlier design.
  await field(page, 'C1 (gate side)').fill('18p');
  const cancelled = await page.evaluate((sel) => new Promise((done) => {
    const box = document.querySelector(`${sel} .run`);
    const look = () => {
      if (box.hidden) { requestAnimationFrame(look); return; }
      box.querySelector('button.cancel').click();
      done(true);
    };
    look();
  }), spreadCard);
  assert.equal(cancelled, true);
  await page.waitForSelector(`${spreadCard}[data-follow="held"]`, { state: 'attached' });
  assert.equal(await page.locator(`${spreadCard} .run`).isHidden(), true);
  assert.equal(await page.locator(`${spreadCard}`).getAttribute('data-computed'), '1');
  assert.match(await page.locator(`${spreadCard} .stale-note`).textContent(), /^Run cancelled/);
  assert.equal(await page.locator(`${spreadCard} [data-key="yield"]`).textContent(), head);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('a pinned reference: drawn under the plots and beside the figures, as the core gives it', async () => {
  const { page } = await openPanel(browser.context, 'crystal');
  await page.waitForSelector(`${panel}[data-follow="settled"]`);
  await page.getByRole('button', { name: 'Pin as reference' }).click();
  const pinned = await page.evaluate(() => HR.compare.text());
  const n = await computed(page);
  await field(page, 'C1 (gate side)').fill('22p');
  await recomputed(page, n);
  // The reference's runs land after the design's: wait for them to be drawn.
  await page.waitForFunction(() => document.querySelector('#panel-crystal dd[data-key="f_osc"] .vs')
    && [...document.querySelectorAll('#panel-crystal figure.plot')].filter((f) => f.uplot).every((f) => f.dataset.reference));
  const ref = cli('crystal', pinned);
  const now = cli('crystal', await page.evaluate(() => HR.design.text()));
  const line = (await page.locator(`${panel} dd[data-key="f_osc"] .vs`).textContent()).replace(/\u2009/g, '');
  const [refHz, delta] = await page.evaluate(([a, b]) => {
    const d = HR.fmt(a - b, 'Hz', 3);
    return [HR.fmt(b, 'Hz', 9), a - b > 0 && /[1-9]/.test(d) ? `+${d}` : d];
  }, [now.f_osc_hz, ref.f_osc_hz]);
  assert.equal(line, `ref ${refHz} · Δ ${delta}`);
  assert.match(await page.locator(`${panel} dd[data-key="margin"] .vs`).textContent(), /^ref \d+\.\d\d · Δ /);
  // The frequency error's difference in ppm, as this design's less the reference's.
  const ppm = await page.evaluate((d) => `${d > 0 ? '+' : ''}${HR.fixed(d, 2)} ppm`, now.pull_ppm - ref.pull_ppm);
  assert.ok((await page.locator(`${panel} dd[data-key="pull"] .vs`).textContent()).endsWith(`· Δ ${ppm}`), ppm);
  // Each plot carries a series labelled "reference", the core's curves on the pinned text.
  const plots = await page.evaluate(() => {
    const curves = HR.call('crystalCurves', HR.compare.text()).ok;
    const byTitle = [['Negative', curves.gm.r_neg_ohm], ['Frequency', curves.pulling.pull_ppm], ['Start-up', curves.envelope.im_a]];
    return [...document.querySelectorAll('#panel-crystal figure.plot')].filter((f) => f.uplot && !f.closest('[hidden]')).map((f) => {
      const u = f.uplot;
      const at = u.series.findIndex((s) => s.label === 'reference');
      const title = f.querySelector('figcaption').textContent;
      const want = byTitle.find(([t]) => title.startsWith(t))[1];
      // With the same x, the reference's values are the core's exactly.
      return { title, ref: at > 0, kind: f.dataset.reference, exact: f.dataset.reference !== 'same-x' || u.data[at].every((v, i) => v === want[i]) };
    });
  });
  assert.equal(plots.length, 3);
  for (const p of plots) assert.ok(p.ref && p.exact, JSON.stringify(p));
  // The locus: the reference's points counted on the plane.
  assert.ok(Number(await page.locator(`${panel} figure.plane`).getAttribute('data-reference')) > 10);
  // The spread: the reference's yield beside this design's once asked for.
  await page.locator(spreadCard).getByRole('button', { name: 'Run the spread' }).click();
  await page.waitForSelector(`${spreadCard}[data-computed="1"][data-follow="settled"]`, { timeout: 120000 });
  assert.match(await page.locator(`${spreadCard} .vs-line`).textContent(), /Reference not computed here/);
  await page.locator(spreadCard).getByRole('button', { name: 'Compute the reference too' }).click();
  await page.waitForSelector(`${spreadCard} [data-key="yield"] .vs`, { timeout: 120000 });
  const refYield = cli('crystal', pinned, '--spread').yield;
  assert.ok((await page.locator(`${spreadCard} [data-key="yield"] .vs`).textContent())
    .startsWith(`ref ${await words(page, (y) => HR.fixed(100 * y, 1), refYield)} %`));
  // Clear takes it all away.
  await page.getByRole('button', { name: 'Clear reference' }).click();
  await page.waitForFunction(() => !document.querySelector('#panel-crystal dd[data-key="f_osc"] .vs'));
  assert.equal(await page.locator(`${panel} figure.plane`).getAttribute('data-reference'), '');
  assert.equal(await page.locator(`${spreadCard} [data-key="yield"] .vs`).count(), 0);
  await page.close();
});
