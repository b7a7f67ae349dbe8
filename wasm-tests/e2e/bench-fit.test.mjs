// The bench fit on the Part panel as a user finishes it: choosing the parameters to
// fit (a refusal points at the box to untick), reading the judgement of the fit (a
// poor one said to be poor, naming the reading that disagrees), using the part with
// values rounded to their uncertainty, a fit marked out of date once what it was made
// from changes, and the preset selector saying when the part is custom. Every step waits for what the page shows, never for a time.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, clearStorage, openPanel, undoButton, cli } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const panel = (page) => page.locator('#panel-part');
const box = (page, name) => panel(page).locator('fieldset.choices').getByLabel(name, { exact: true });
const fitted = (page) => panel(page).getAttribute('data-fitted').then(Number);
// The value a Part field holds, found by its label.
const partValue = (page, label) => page.evaluate((label) =>
  [...document.querySelectorAll('#panel-part label')].find((l) => l.textContent === label).control.value, label);
const partValueIs = (page, label, value, is = true) => page.waitForFunction(([label, value, is]) =>
  ([...document.querySelectorAll('#panel-part label')].find((l) => l.textContent === label).control.value === value) === is,
[label, value, is]);
// Presses "Fit the part" once the panel's figures of the last edit are in (their
// errors are routed over the panel's fields), and waits until the fit is over: a
// result counted, or a refusal shown.
async function fit(page) {
  await page.waitForSelector('#panel-part[data-follow="settled"]', { state: 'attached' });
  const n = await fitted(page);
  await page.getByRole('button', { name: 'Fit the part' }).click();
  await page.waitForFunction((n) => {
    const p = document.getElementById('panel-part');
    const busy = p.querySelector('.busy');
    const refused = [...p.querySelectorAll('.error')].some((e) => e.textContent !== '');
    return busy.hidden && (Number(p.dataset.fitted || 0) > n || refused);
  }, n);
}
const paramRows = (page) => panel(page).locator('table').filter({ hasText: 'Fitted parameters' }).locator('tbody th');
const verdict = (page) => panel(page).locator('p.verdict');

test('the parameters to fit are a box each; a refusal points at the box to untick, and unticked ones are held', async () => {
  const { page, seen } = await openPanel(browser.context, 'part');
  // Untouched, the boxes are what the demo's readings determine.
  for (const [name, ticked] of [['kn', true], ['kp', true], ['vtn', false], ['vtp', false],
    ['lambda (both λ, one factor)', true], ['cap (the three capacitances, one factor)', true]]) {
    assert.equal(await box(page, name).isChecked(), ticked, name);
  }
  // Gains read at one low frequency do not depend on the capacitance: fitting it too is refused there.
  await page.getByLabel('Open-loop gain readings').fill('10 Hz, 17.8\n10 Hz, 17.9');
  await page.waitForFunction(() => !document.querySelector('#panel-part fieldset.choices input[value="cap"]').checked);
  await box(page, 'cap (the three capacitances, one factor)').check();
  await fit(page);
  const group = panel(page).locator('fieldset.choices');
  assert.match(await group.locator('.error').textContent(), /cannot determine cap: add readings that depend on it, or leave it out of the fit/);
  assert.equal(await box(page, 'cap (the three capacitances, one factor)').getAttribute('aria-invalid'), 'true', 'the box to untick is flagged');
  assert.equal(await box(page, 'kn').getAttribute('aria-invalid'), 'false');
  assert.equal(await page.getByRole('button', { name: 'Use this part' }).isDisabled(), true, 'a refused fit offers no part');
  // Unticking it clears the refusal, and the fit runs on the others.
  await box(page, 'cap (the three capacitances, one factor)').uncheck();
  assert.equal(await group.locator('.error').textContent(), '');
  await fit(page);
  assert.deepEqual(await paramRows(page).allTextContents(), ['kn', 'kp', 'lambda']);
  // The capacitances were not fitted: using the part leaves them as typed.
  await page.getByRole('button', { name: 'Use this part' }).click();
  await partValueIs(page, 'kn (NMOS)', '6m', false);
  assert.equal(await page.getByLabel('Cgs', { exact: true }).inputValue(), '4p');
  assert.equal(await page.getByLabel('Cdb', { exact: true }).inputValue(), '3p');
  // The choice is the design's: undone with the rest.
  await undoButton(page).click();
  await partValueIs(page, 'kn (NMOS)', '6m');
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('the fit is judged: a good one says so with its χ², a poor one names the reading that disagrees', async () => {
  const { page, seen } = await openPanel(browser.context, 'part');
  await fit(page);
  assert.match(await verdict(page).textContent(), /^Good fit: χ²\/dof = \d+\.\d\d for 1 degree of freedom/);
  assert.equal(await verdict(page).getAttribute('data-poor'), 'false');
  assert.match(await panel(page).locator('dd[data-key="chi2"]').textContent(), /^\d+\.\d\d \(a good fit: under 6\.58\)$/);
  assert.match(await panel(page).locator('dd[data-key="worst"]').textContent(), /^gain at .+, [+−]\d+\.\d\dσ$/);
  assert.equal(await panel(page).locator('dd[data-key="loose"]').textContent(), 'none');
  // A fourth gain reading far off the others: the fit is poor, and says which reading.
  const gains = page.getByLabel('Open-loop gain readings');
  await gains.fill(`${await gains.inputValue()}\n1 MHz, 25`);
  await fit(page);
  await page.waitForFunction(() => document.querySelector('#panel-part p.verdict').dataset.poor === 'true');
  const words = await verdict(page).textContent();
  assert.match(words, /^Poor fit: gain at 1\.000 MHz \(−\d+\.\dσ\)/, words);
  assert.match(await panel(page).locator('dd[data-key="worst"]').textContent(), /^gain at 1\.000 MHz, −\d+\.\d\dσ$/);
  const flagged = panel(page).locator('table').filter({ hasText: 'Each reading against' }).locator('tbody tr.disagree th');
  assert.ok((await flagged.allTextContents()).includes('gain at 1.000 MHz'), 'its row is marked');
  // Gains at two nearby low frequencies barely depend on the capacitance: its
  // uncertainty exceeds its value, and the page says so.
  await gains.fill('100 kHz, 17.8\n200 kHz, 17.7');
  await fit(page);
  await page.waitForFunction(() => document.querySelector('#panel-part dd[data-key="loose"]').textContent === 'cap');
  assert.match(await verdict(page).textContent(), /The readings barely set cap: its uncertainty exceeds its value/);
  assert.match(await panel(page).locator('table').filter({ hasText: 'Fitted parameters' }).locator('tbody tr').last().locator('.loose').textContent(),
    /\(above the value\)$/);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('Use this part writes each fitted value to the digits its uncertainty supports, in one undoable step', async () => {
  const { page } = await openPanel(browser.context, 'part');
  await fit(page);
  // What the core rounds them to, asked of the command on the same design.
  const wanted = cli('fit', await page.evaluate(() => HR.design.text())).fitted_fields;
  const shown = await panel(page).locator('table').filter({ hasText: 'Fitted parameters' }).locator('tbody td').first().textContent();
  await page.getByRole('button', { name: 'Use this part' }).click();
  await partValueIs(page, 'kn (NMOS)', '6m', false);
  for (const [label, key] of [['kn (NMOS)', 'kn_a_per_v2'], ['kp (PMOS)', 'kp_a_per_v2'], ['λn', 'lambda_n_per_v'],
    ['λp', 'lambda_p_per_v'], ['Cgs', 'cgs_f'], ['Cgd', 'cgd_f'], ['Cdb', 'cdb_f']]) {
    const text = await partValue(page, label);
    // Written as values are typed (`6.76m`, not 0.00676), reading back as exactly the
    // value the core rounded.
    assert.match(text, /^-?\d+(\.\d+)?[pnµm]$/, `${label}: ${text}`);
    assert.equal(await page.evaluate((t) => wasm_bindgen.parseValue(t, '', 'value').value, text), wanted[key], `${label}: ${text}`);
    const digits = text.replace(/e.*$/, '').replace(/[^0-9]/g, '').replace(/^0+/, '');
    assert.ok(digits.length >= 2 && digits.length <= 4, `${label}: ${text}, a handful of digits`);
  }
  // The table shows the value to the same digits (6.76m A/V² for 0.00676).
  const digitsIn = (t) => t.replace(/e.*$/, '').replace(/[^0-9]/g, '').replace(/^0+/, '');
  assert.equal(digitsIn(shown.replace(/\s*[mµ]?\s*A\/V²$/, '')), digitsIn(String(wanted.kn_a_per_v2)), shown);
  // Fields not fitted stay as typed.
  assert.equal(await partValue(page, 'Vtn'), '0.55');
  await undoButton(page).click();
  await partValueIs(page, 'Cgs', '4p');
  assert.equal(await partValue(page, 'kn (NMOS)'), '6m');
  await page.close();
});

test('a fit is marked out of date once the readings or the held part change, and its part is not offered until fitted again', async () => {
  const { page, seen } = await openPanel(browser.context, 'part');
  const note = panel(page).locator('p.outdated');
  const use = page.getByRole('button', { name: 'Use this part' });
  // Waits until the fit on show is out of date for `why` ('' : it is the design's own).
  const outdated = (why) => page.waitForFunction((w) => {
    const results = document.querySelector('#panel-part p.outdated').parentElement;
    return results.dataset.outdated === w;
  }, why);
  await fit(page);
  assert.equal(await note.isVisible(), false);
  assert.equal(await use.isEnabled(), true);
  // A reading added after the fit: the fit says it is for the old readings, muted, and
  // its part is no longer offered.
  const gains = page.getByLabel('Open-loop gain readings');
  const before = await gains.inputValue();
  await gains.fill(`${before}\n1 MHz, 15`);
  await outdated('readings');
  assert.equal(await note.textContent(), 'Readings changed since this fit — fit again to use its part.');
  assert.equal(await note.isVisible(), true);
  assert.equal(await use.isDisabled(), true);
  assert.match(await panel(page).locator('p.verdict').locator('xpath=..').getAttribute('class'), /\bstale\b/);
  // Undone, the readings are the fit's again: it is offered again.
  await undoButton(page).click();
  await outdated('');
  assert.equal(await note.isVisible(), false);
  assert.equal(await use.isEnabled(), true);
  // A value of the part the fit held (Vtn is not fitted here) changed: out of date too.
  await page.getByLabel('Vtn', { exact: true }).fill('0.6');
  await outdated('part');
  assert.equal(await note.textContent(), 'The part’s held values changed since this fit — fit again to use its part.');
  assert.equal(await use.isDisabled(), true);
  // Fitted again: the design's own fit, whose part Use writes without making it out of date.
  await fit(page);
  await outdated('');
  assert.equal(await use.isEnabled(), true);
  await use.click();
  await partValueIs(page, 'kn (NMOS)', '6m', false);
  assert.equal(await note.isVisible(), false);
  assert.equal(await use.isEnabled(), true);
  // Another choice of parameters is another fit.
  await box(page, 'lambda (both λ, one factor)').uncheck();
  await outdated('choice');
  assert.equal(await note.textContent(), 'The parameters to fit changed since this fit — fit again to use its part.');
  assert.equal(await use.isDisabled(), true);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('the preset selector says the part is custom once a field differs, and names the preset again when all match', async () => {
  const { page } = await openPanel(browser.context, 'part');
  const pick = page.getByLabel('Preset (illustrative, not a datasheet)');
  const showing = (id) => page.waitForFunction((id) => [...document.querySelectorAll('#panel-part select')]
    .find((s) => s.dataset.matches !== undefined).value === id, id);
  // The demo's own part is no preset.
  await showing('custom');
  assert.match(await pick.locator('option:checked').textContent(), /^Custom part/);
  await pick.selectOption('unbuffered-5v');
  await page.getByRole('button', { name: 'Load preset' }).click();
  await showing('unbuffered-5v');
  const kn = page.getByLabel('kn (NMOS)', { exact: true });
  assert.equal(await kn.inputValue(), '0.0035');
  // One field changed: custom, and there is no preset to load under that name.
  await kn.fill('3.6m');
  await showing('custom');
  assert.match(await pick.locator('option:checked').textContent(), /^Custom part/);
  assert.equal(await page.getByRole('button', { name: 'Load preset' }).isDisabled(), true);
  // Back to the preset's value, typed another way: the preset's name again.
  await kn.fill('3.5m');
  await showing('unbuffered-5v');
  assert.equal(await pick.locator('option:checked').textContent(), 'Generic unbuffered, 5 V (illustrative)');
  // An edit elsewhere in the design leaves the choice alone.
  await pick.selectOption('buffered-5v');
  await page.getByLabel('Load of the gain readings').fill('22k');
  assert.equal(await pick.inputValue(), 'buffered-5v');
  await page.close();
});
