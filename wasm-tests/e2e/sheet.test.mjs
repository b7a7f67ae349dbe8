// The printed design sheet in Chromium from file://: Print sheet (the Design bar)
// computes the sheet in the background and prints it, and the browser's own print
// (`beforeprint`, which page.pdf() fires as Ctrl+P does) gives the same sheet for the
// design as it is then. The PDF is read back with pdf.js: one or two pages, A4 and
// Letter; every figure of the core's sheet (sheetText, the text of `halfrail report`)
// is in it, the gain, the phase margin, the component values and the page's cautions
// word for word; the schematic and the two plots are images; no network request.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import { launch, openPanel, clearStorage } from './browser.mjs';
import { readPdf, squash } from './pdf.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

// Stubs window.print (headless has no dialog) to count calls, presses Print sheet and
// waits for the print.
async function pressPrint(page) {
  await page.evaluate(() => { window.printed = 0; window.print = () => { window.printed += 1; }; });
  await page.locator('#docbar').getByRole('button', { name: 'Print sheet', exact: true }).click();
  await page.waitForFunction(() => window.printed === 1, null, { timeout: 20000 });
}

// The core's own sheet of the page's design as Markdown: its tables' value cells,
// but for the components' `key` column, which the printed sheet leaves out (the keys
// stay in the file and in `halfrail report`): `keys` are those cells.
async function coreCells(page) {
  const md = await page.evaluate(() => wasm_bindgen.sheetText(HR.design.text(), true));
  const rows = md.split('\n').filter((l) => l.startsWith('| ') && !/^\| -{3}/.test(l));
  let keyAt = -1;
  const keys = [];
  const cells = rows.flatMap((l) => {
    const row = l.slice(2, -2).split(' | ').map((c) => squash(c.replace(/\\\|/g, '|').replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&amp;/g, '&')));
    if (row.includes('key')) keyAt = row.indexOf('key');
    else if (row.length <= keyAt || !/^[a-z]+(_[a-z0-9]+)+$/.test(row[keyAt] || '')) keyAt = -1;
    if (keyAt >= 0) keys.push(row[keyAt]);
    return row.filter((_, i) => i !== keyAt);
  });
  return { md, cells: [...new Set(cells.filter(Boolean))], keys };
}

test('Print sheet prepares the sheet in the background and prints it: the PDF has every figure of the core sheet, the cautions, the images, on one or two pages', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  const workers = await page.evaluate(() => HR.background.startedIn.sheet || 0);
  await pressPrint(page);
  assert.ok(await page.evaluate(() => HR.background.startedIn.sheet || 0) > workers, 'the sheet was computed in a worker');
  assert.match(await page.locator('#engine-status').textContent(), /sheet/i);
  const { cells } = await coreCells(page);
  const figures = await page.evaluate(() => {
    const r = wasm_bindgen.responseReport(HR.design.text()).design;
    return { gain: HR.fmt(r.gain_db, 'dB'), nf: HR.fmt(r.nf_db, 'dB'), version: HR.version };
  });
  const cautions = (await page.locator('#cautions > p').first().textContent()).replace('Before you build:', '').split(/(?<=\.)\s+/).map(squash).filter(Boolean);
  const pdf = await readPdf(await page.pdf({ format: 'A4' }));
  assert.ok(pdf.pages.length >= 1 && pdf.pages.length <= 2, `${pdf.pages.length} pages`);
  const missing = cells.filter((c) => !pdf.text.includes(c));
  assert.deepEqual(missing, [], 'every cell of the core sheet is printed');
  for (const t of ['Design sheet', 'Voltage gain Av', figures.gain, 'Phase margin', 'Noise figure NF', figures.nf, 'Verdict',
    '100R', '2k2', '56R', '100 nF', 'Before you build', `Halfrail ${figures.version}`, 'Link to this design: file://']) {
    assert.ok(pdf.text.includes(squash(t)), `the PDF has “${t}”`);
  }
  assert.ok(cautions.length >= 5);
  // Word for word; the footer starts its first sentence after “Before you build:”.
  for (const c of cautions) assert.ok(pdf.text.toLowerCase().includes(squash(c).toLowerCase()), `the caution “${c}” word for word`);
  assert.match(pdf.text, /printed \d{4}-\d\d-\d\d/);
  assert.ok(pdf.images >= 3, `${pdf.images} images: the schematic and two plots`);
  assert.equal(await page.locator('#sheet img').count(), 3);
  for (const ok of await page.locator('#sheet img').evaluateAll((imgs) => imgs.map((i) => i.complete && i.naturalWidth > 600 && i.alt.length > 0))) assert.ok(ok);
  // Letter paper too.
  const letter = await readPdf(await page.pdf({ format: 'Letter' }));
  assert.ok(letter.pages.length <= 2, `${letter.pages.length} Letter pages`);
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('The browser’s own print gives the same sheet, for the design as it is when printing; a bad value prints the last good design and says so', async () => {
  const { page, seen } = await openPanel(browser.context, 'response');
  await pressPrint(page);
  const byButton = await page.locator('#sheet').textContent();
  await page.evaluate(() => window.dispatchEvent(new Event('beforeprint')));
  assert.equal(await page.locator('#sheet').textContent(), byButton, 'beforeprint rebuilt the same sheet');

  // An edit, then Ctrl+P (page.pdf fires beforeprint): the sheet follows the edit.
  await page.evaluate(() => HR.design.set('stage', 'r_fb_ohm', '3k3'));
  await page.waitForFunction(() => HR.sheet.linkIsCurrent()); // made 300 ms after the edit
  const gain = await page.evaluate(() => HR.fmt(wasm_bindgen.responseReport(HR.design.text()).design.gain_db, 'dB'));
  const edited = await readPdf(await page.pdf({ format: 'A4' }));
  assert.ok(edited.text.includes('3k3') && !edited.text.includes(' 2k2 '), 'the edited R fb is printed');
  assert.ok(edited.text.includes(squash(gain)), `the new gain ${gain}`);
  const { cells } = await coreCells(page);
  assert.deepEqual(cells.filter((c) => !edited.text.includes(c)), []);
  // The sheet's link opens this design.
  const href = await page.locator('#sheet .link a').getAttribute('href');
  const draft = await page.evaluate(() => HR.design.text());
  const other = await browser.context.newPage();
  await other.goto(href);
  await other.waitForFunction(() => document.documentElement.dataset.ready === 'true');
  assert.equal(await other.evaluate(() => HR.design.text()), draft);
  await other.close();

  // A bad value: the sheet is of the last good design, and says so.
  await page.evaluate(() => HR.design.set('stage', 'r_fb_ohm', '3k3x'));
  const bad = await readPdf(await page.pdf({ format: 'A4' }));
  assert.match(bad.text, /bad value \(R fb: /);
  assert.ok(bad.text.includes('3k3'), 'the last good R fb');
  assert.ok(bad.pages.length <= 2);
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('The sheet prints dark ink on white in the dark theme too, and shows nowhere on screen', async () => {
  const { page, seen } = await openPanel(browser.context, 'part');
  await page.emulateMedia({ colorScheme: 'dark' });
  await pressPrint(page);
  assert.equal(await page.locator('#sheet').isVisible(), false, 'hidden on screen');
  await page.emulateMedia({ media: 'print', colorScheme: 'dark' });
  const look = await page.evaluate(() => ({
    sheet: getComputedStyle(document.getElementById('sheet')).color,
    body: getComputedStyle(document.body).backgroundColor,
    header: getComputedStyle(document.querySelector('.top')).display,
    td: getComputedStyle(document.querySelector('#sheet td')).color,
  }));
  assert.deepEqual(look, { sheet: 'rgb(27, 31, 29)', body: 'rgb(255, 255, 255)', header: 'none', td: 'rgb(27, 31, 29)' });
  // The schematic is drawn in dark ink whatever the theme: its darkest pixels are dark.
  const ink = await page.evaluate(async () => {
    const img = document.querySelector('#sheet section img');
    await img.decode();
    const c = document.createElement('canvas');
    [c.width, c.height] = [img.naturalWidth, img.naturalHeight];
    const ctx = c.getContext('2d');
    ctx.drawImage(img, 0, 0);
    const d = ctx.getImageData(0, 0, c.width, c.height).data;
    let dark = 0;
    let light = 0;
    for (let i = 0; i < d.length; i += 4) {
      if (d[i + 3] < 200) continue;
      if (d[i] + d[i + 1] + d[i + 2] < 150) dark += 1; else if (d[i] + d[i + 1] + d[i + 2] > 600) light += 1;
    }
    return { dark, light };
  });
  assert.ok(ink.dark > 1000, `dark ink pixels: ${ink.dark}`);
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
