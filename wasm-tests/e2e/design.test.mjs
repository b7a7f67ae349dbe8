// The Stage panel's design to a target in Chromium from file://, on the demo (12 dB,
// E24, low corner 100 kHz): Design lists the standard pairs the native CLI finds
// (`halfrail design`), the by-hand pair shows its large error, Use puts the best pair
// and its coupling capacitors into the stage as one undoable step, an unreachable target
// says so with the nearest reachable gain, and a bad target value is reported at its field.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, clearStorage, openPanel, cli, undoButton, redoButton } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

// The native CLI's design for a document (built by `make test-e2e`).
const cliDesign = (text) => cli('design', text);

const panel = (page) => page.locator('#panel-stage');
const designs = (page) => panel(page).getAttribute('data-designed').then(Number);
const designed = (page, n) => page.waitForFunction((m) => Number(document.getElementById('panel-stage').dataset.designed || 0) > m, n);
const computed = (page) => panel(page).getAttribute('data-computed').then(Number);
const recomputed = (page, n) => page.waitForFunction((m) => Number(document.getElementById('panel-stage').dataset.computed) > m, n);
const rows = (page) => page.locator('#panel-stage table.candidates tbody tr');
const cells = (row) => row.locator('td').allTextContents();
const handRow = (page, start) => page.locator('#panel-stage .design-out tbody tr').filter({ hasText: start });
const stage = (page) => page.evaluate(() => ({ ...HR.design.section('stage') }));
// A stage value as the core reads it.
const valueOf = (page, key) => page.evaluate((k) => HR.design.value('stage', k, k.endsWith('_f') ? 'F' : 'Ω'), key);
const press = async (page) => {
  const n = Number(await panel(page).getAttribute('data-designed')) || 0;
  await page.getByRole('button', { name: 'Design', exact: true }).click();
  await designed(page, n);
};

test('Design lists the candidates the CLI finds, with the by-hand pair and its error beside them', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  assert.equal(await page.locator('#panel-stage .design-out').isVisible(), false, 'nothing before Design is pressed');
  await press(page);
  const d = cliDesign(await page.evaluate(() => HR.design.text()));
  assert.equal(d.feasible, true);
  assert.ok(d.candidates.length >= 3, `${d.candidates.length} candidates`);
  assert.equal(await rows(page).count(), d.candidates.length);
  const rkm = (v) => page.evaluate((x) => wasm_bindgen.formatRkm(x, 'R'), v);
  for (const [i, c] of d.candidates.slice(0, 3).entries()) {
    const [rin, rfb, gain, off] = await cells(rows(page).nth(i));
    assert.equal(rin, await rkm(c.r_in_ohm), `row ${i + 1}: R in`);
    assert.equal(rfb, await rkm(c.r_fb_ohm), `row ${i + 1}: R fb`);
    assert.equal(gain, `${c.gain_db.toFixed(2)} dB`, `row ${i + 1}: gain`);
    const shown = c.error_db.toFixed(2) === '-0.00' ? '0.00' : c.error_db.toFixed(2);
    assert.equal(off, `${c.error_db > 0 && shown !== '0.00' ? '+' : ''}${shown} dB`, `row ${i + 1}: error`);
  }
  // The best pair reads back as the CLI's values, and meets the target closely.
  const best = d.candidates[0];
  const [rin, rfb] = await cells(rows(page).first());
  assert.deepEqual(await page.evaluate(([a, b]) => [wasm_bindgen.parseValue(a, 'Ω', 'x').value, wasm_bindgen.parseValue(b, 'Ω', 'x').value], [rin, rfb]),
    [best.r_in_ohm, best.r_fb_ohm]);
  assert.ok(Math.abs(best.error_db) < 0.5, `best error ${best.error_db} dB`);

  // The by-hand pair (the ideal ratio snapped to E24) misses by several dB: the part's gain is finite.
  const bh = d.by_hand;
  assert.ok(Math.abs(bh.error_db) > 3, `by-hand error ${bh.error_db} dB`);
  const hand = await cells(handRow(page, 'By hand'));
  assert.deepEqual(hand, [await rkm(bh.r_in_ohm), await rkm(bh.r_fb_ohm), `${bh.gain_db.toFixed(2)} dB`, `${bh.error_db.toFixed(2)} dB`]);
  assert.match(await page.locator('#panel-stage .design-out').textContent(), new RegExp(`by-hand pair gives ${bh.gain_db.toFixed(2)} dB, ${Math.abs(bh.error_db).toFixed(2)} dB short of the target`));
  const mine = await cells(handRow(page, 'Designed'));
  assert.deepEqual(mine.slice(0, 3), [rin, rfb, `${best.gain_db.toFixed(2)} dB`]);

  // The continuous answer and the coupling capacitors for the 100 kHz corner.
  const text = await page.locator('#panel-stage .design-best').textContent();
  const exact = await page.evaluate((v) => HR.fmt(v, 'Ω', 4), d.continuous_r_fb_ohm);
  assert.ok(text.includes(`R fb ${exact}`), `${text} has R fb ${exact}`);
  assert.ok(d.c_in_f > 0 && d.c_out_f > 0);
  const caps = await page.evaluate((x) => [HR.fmt(x.c_in_f, 'F', 2), HR.fmt(x.c_out_f, 'F', 2), HR.fmt(x.f_low_hz, 'Hz', 4)], d);
  assert.match(await panel(page).textContent(), new RegExp(`C in ${caps[0]}, C out ${caps[1]}, giving a corner at ${caps[2]}`));
  assert.equal(await page.locator('#panel-stage .design-out .warning').isVisible(), false);
  assert.doesNotMatch(await panel(page).textContent(), /NaN|undefined|Infinity/);
  assert.deepEqual(seen.errors, []);
  assert.deepEqual(seen.requests, []);
  await page.close();
});

test('Use applies the best pair and the coupling capacitors as one step; one undo restores them all', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  await press(page);
  const d = cliDesign(await page.evaluate(() => HR.design.text()));
  const before = await stage(page);
  const keys = ['r_in_ohm', 'r_fb_ohm', 'c_in_f', 'c_out_f'];
  let n = await computed(page);
  await rows(page).first().getByRole('button', { name: /^Use/ }).click();
  await recomputed(page, n);
  const applied = {};
  for (const k of keys) applied[k] = await valueOf(page, k);
  assert.deepEqual(applied, { r_in_ohm: d.candidates[0].r_in_ohm, r_fb_ohm: d.candidates[0].r_fb_ohm, c_in_f: d.c_in_f, c_out_f: d.c_out_f });
  const rkm = (v) => page.evaluate((x) => wasm_bindgen.formatRkm(x, 'R'), v);
  const [rinCode, rfbCode] = [await rkm(d.candidates[0].r_in_ohm), await rkm(d.candidates[0].r_fb_ohm)];
  assert.ok((await page.locator('#panel-stage button.value[data-key="r_fb_ohm"]').textContent()).includes(rfbCode), 'the schematic shows it');
  // The stage's own figures follow: the gain at f_design is now the candidate's (the
  // core judges the candidates with the coupling capacitors it picks).
  const now = parseFloat(await page.locator('#panel-stage dd[data-key="gain"]').textContent());
  assert.ok(Math.abs(now - d.candidates[0].gain_db) < 0.01, `the stage gives ${now} dB, the candidate ${d.candidates[0].gain_db} dB`);
  assert.equal(await page.evaluate(() => HR.design.undoLabel()), `use ${rinCode} / ${rfbCode}`);

  n = await computed(page);
  await undoButton(page).click();
  await recomputed(page, n);
  assert.deepEqual(await stage(page), before, 'one undo brings back all four values');
  n = await computed(page);
  await redoButton(page).click();
  await recomputed(page, n);
  assert.equal(await valueOf(page, 'r_fb_ohm'), d.candidates[0].r_fb_ohm);
  assert.equal(await valueOf(page, 'c_in_f'), d.c_in_f);

  // Without the capacitors: only the resistors change.
  await undoButton(page).click();
  await page.getByLabel('Use fits these capacitors too').uncheck();
  n = await computed(page);
  await rows(page).nth(1).getByRole('button', { name: /^Use/ }).click();
  await recomputed(page, n);
  const after = await stage(page);
  assert.equal(after.c_in_f, before.c_in_f);
  assert.equal(after.c_out_f, before.c_out_f);
  assert.equal(await valueOf(page, 'r_in_ohm'), d.candidates[1].r_in_ohm);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('an unreachable target says so with the nearest reachable gain; the form persists', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  const gain = page.getByLabel('Gain wanted');
  await gain.fill('25');
  await press(page);
  const d = cliDesign(await page.evaluate(() => HR.design.text()));
  assert.equal(d.feasible, false);
  assert.equal(d.candidates.length, 0);
  const warning = page.locator('#panel-stage .design-out .warning');
  assert.equal(await warning.isVisible(), true);
  const text = await warning.textContent();
  assert.match(text, /^This part cannot reach 25\.00 dB at f_design \(10\.70 MHz\)/);
  assert.ok(text.includes(`The nearest target it can meet is ${d.ceiling_db.toFixed(2)} dB`), text);
  assert.equal(await page.locator('#panel-stage table.candidates').isVisible(), false, 'no pairs to list');
  assert.equal(await page.getByLabel('Use fits these capacitors too').isVisible(), false, 'no capacitors to fit');
  // The by-hand pair is still shown, far off.
  assert.match((await cells(handRow(page, 'By hand')))[3], /^-1\d\.\d\d dB$/);

  // Once asked, the design follows the form: a reachable gain lists pairs again.
  const n = await designs(page);
  await gain.fill('15');
  await designed(page, n);
  assert.equal(await warning.isVisible(), false);
  assert.ok(await rows(page).count() > 0);
  assert.match(await page.locator('#panel-stage .design-best').textContent(), /^Best E24 pair: /);
  // The target is part of the design: kept over a reload, with the series chosen.
  await page.getByLabel('Resistor series').selectOption('E12');
  await designed(page, n + 1);
  assert.match(await page.locator('#panel-stage .design-best').textContent(), /^Best E12 pair: /);
  // Joined resistors: R fb as two standard values, shown as the CLI joins them.
  await page.getByLabel('R fb may be two standard values, in series or parallel').check();
  await designed(page, n + 2);
  const joined = cliDesign(await page.evaluate(() => HR.design.text())).candidates[0];
  assert.ok(joined.r_fb_parts_ohm, 'the best pair has a joined R fb');
  const parts = await page.evaluate((c) => c.r_fb_parts_ohm.map((v) => wasm_bindgen.formatRkm(v, 'R')).join(c.r_fb_joined === 'series' ? ' + ' : ' ∥ '), joined);
  assert.equal((await cells(rows(page).first()))[1], parts);
  await page.reload();
  await page.waitForSelector('#panel-stage[data-computed]');
  assert.equal(await page.getByLabel('Gain wanted').inputValue(), '15');
  assert.equal(await page.getByLabel('Resistor series').inputValue(), 'E12');
  assert.equal(await page.getByLabel('R fb may be two standard values, in series or parallel').isChecked(), true);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('a bad target value is reported at its field, and the last candidates stay, marked', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  await press(page);
  const first = await cells(rows(page).first());
  const gain = page.getByLabel('Gain wanted');
  await gain.fill('12 dBx');
  await page.waitForFunction(() => document.querySelector('#panel-stage .design-out.stale'));
  assert.equal(await gain.getAttribute('aria-invalid'), 'true');
  const reason = await page.locator('#panel-stage .field').filter({ has: gain }).locator('.error').textContent();
  assert.match(reason, /`dBx` is not a unit/);
  await page.getByRole('button', { name: 'Design', exact: true }).click();
  assert.equal(await gain.getAttribute('aria-invalid'), 'true');
  assert.deepEqual(await cells(rows(page).first()), first, 'the last candidates stay');
  // A limit out of range is refused at its own field too.
  await gain.fill('12');
  const s11 = page.getByLabel('S11 at most');
  await s11.fill('3');
  await page.waitForFunction(() => document.querySelector('#panel-stage input[aria-invalid="true"]'));
  assert.equal(await s11.getAttribute('aria-invalid'), 'true');
  assert.equal(await gain.getAttribute('aria-invalid'), 'false');
  await s11.fill('');
  await page.waitForFunction(() => !document.querySelector('#panel-stage .design-out.stale'));
  assert.equal(await s11.getAttribute('aria-invalid'), 'false');
  assert.doesNotMatch(await panel(page).textContent(), /NaN|undefined/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
