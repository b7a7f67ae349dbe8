// The printed design sheet in Chromium from file://: the sheet is prepared in the
// background after each change, Print sheet waits for it and prints it, and the
// browser's own print (`beforeprint`, which page.pdf() fires as Ctrl+P does) gives
// the same sheet for the design as it is then, with no core call on the main thread:
// before the sheet of the latest change is ready it prints the earlier one, or a
// sheet that is not ready, and says so. The PDF is read back with pdf.js: one or two pages, A4 and
// Letter; every figure of the core's sheet (sheetText, the text of `halfrail report`)
// is in it, the gain, the phase margin, the component values and the page's cautions
// word for word; the schematic and the two plots are images; no network request. The
// link is one line cut to fit and whole in note 1, and from file:// it carries no
// folder; the bill of materials prints; the plots' labels meet neither each other nor
// a curve.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'fs';
import http from 'http';
import path from 'path';
import { launch, openPanel, clearStorage, watch, ready, PAGE_PATH, PAGE_URL } from './browser.mjs';
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

// From now on, records the name of every call into the core made on the main thread
// (each entry of wasm_bindgen wrapped once) in `window.__main`, emptied here. The
// workers' calls are their own module's, not recorded.
async function recordMainCalls(page) {
  await page.evaluate(() => {
    if (!window.__main) {
      window.__main = [];
      for (const [name, f] of Object.entries(wasm_bindgen)) {
        if (typeof f !== 'function' || name === 'initSync') continue;
        wasm_bindgen[name] = (...args) => { window.__main.push(name); return f(...args); };
      }
    }
    window.__main.length = 0;
  });
}
// The analyses a sheet needs, which never run on the main thread.
const ANALYSES = ['sheetPage', 'sheetText', 'responseReport', 'loopReport', 'swingReport', 'crystalReport'];

// Ctrl+P as the page sees it: `beforeprint`, with the core calls made on the main
// thread meanwhile, the sheet's state and its text.
const ownPrint = (page) => page.evaluate(() => {
  window.__main.length = 0;
  dispatchEvent(new Event('beforeprint'));
  const sheet = document.getElementById('sheet');
  return { calls: [...window.__main], state: sheet.dataset.state, text: sheet.textContent };
});

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

// The link's end `end`, put after the page's file name, opens the design on `page`.
async function opensTheDesign(page, end) {
  const draft = await page.evaluate(() => HR.design.text());
  const other = await browser.context.newPage();
  await other.goto(PAGE_URL + end);
  await other.waitForFunction(() => document.documentElement.dataset.ready === 'true');
  assert.equal(await other.evaluate(() => HR.design.text()), draft);
  await other.close();
}

test('Print sheet prepares the sheet in the background and prints it: the PDF has every figure of the core sheet, the cautions, the images, on one or two pages', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  await recordMainCalls(page);
  const workers = 0; // the sheet may be prepared before Print sheet is pressed
  await pressPrint(page);
  assert.ok(await page.evaluate(() => HR.background.startedIn.sheet || 0) > workers, 'the sheet was computed in a worker');
  assert.deepEqual(await page.evaluate((a) => window.__main.filter((n) => a.includes(n)), ANALYSES), [], 'no analysis on the main thread');
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
    '100R', '2k2', '56R', '100 nF', 'Before you build', `Halfrail ${figures.version}`, 'Link to this design (note 1): #stage&d=']) {
    assert.ok(pdf.text.includes(squash(t)), `the PDF has “${t}”`);
  }
  assert.ok(cautions.length >= 5);
  // Word for word; the footer starts its first sentence after “Before you build:”.
  for (const c of cautions) assert.ok(pdf.text.toLowerCase().includes(squash(c).toLowerCase()), `the caution “${c}” word for word`);
  assert.match(pdf.text, /printed \d{4}-\d\d-\d\d/);
  assert.ok(!pdf.text.includes('file:') && !pdf.text.includes(path.dirname(PAGE_PATH)), 'no local path on paper');
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

test('The browser’s own print calls no core on the main thread: it prints the sheet prepared in the background, says in words when that is of an earlier design or not ready, follows the design once prepared; a bad value prints the last good design and says so', async () => {
  // At the page's start, before any sheet is prepared: a sheet that says it is not
  // ready, and no core call (Ctrl+P at once after the page is up).
  const first = await browser.context.newPage();
  const seenFirst = watch(first);
  await first.addInitScript(() => {
    new MutationObserver((m, o) => {
      if (!document.documentElement.dataset.ready) return;
      o.disconnect();
      const calls = [];
      for (const [name, f] of Object.entries(wasm_bindgen)) {
        if (typeof f === 'function' && name !== 'initSync') wasm_bindgen[name] = (...args) => { calls.push(name); return f(...args); };
      }
      dispatchEvent(new Event('beforeprint'));
      const sheet = document.getElementById('sheet');
      window.__atStart = { calls: [...calls], state: sheet.dataset.state, text: sheet.textContent };
    }).observe(document, { subtree: true, attributes: true, attributeFilter: ['data-ready'] }); // no <html> yet
  });
  await first.goto(`${PAGE_URL}#response`);
  await ready(first);
  const atStart = await first.evaluate(() => window.__atStart);
  assert.deepEqual(atStart.calls, [], 'no core call on the main thread at beforeprint');
  assert.equal(atStart.state, 'none');
  assert.match(atStart.text, /The design sheet is not ready yet: it is prepared in the background/);
  assert.match(atStart.text, /Print again in a moment, or use Print sheet/);
  assert.ok(!atStart.text.includes('Voltage gain Av'), 'no figures that are not there');
  // Then prepared in the background, in the sheet's own lane.
  await first.waitForFunction(() => HR.sheet.ready());
  assert.ok(await first.evaluate(() => HR.background.startedIn.sheet) >= 1);
  assert.deepEqual(seenFirst.errors, []);
  await first.close();

  const { page, seen } = await openPanel(browser.context, 'response');
  await page.waitForFunction(() => HR.sheet.ready());
  await recordMainCalls(page);
  const prepared = await ownPrint(page);
  assert.deepEqual(prepared.calls, [], 'no core call on the main thread at beforeprint');
  assert.equal(prepared.state, 'current');
  assert.ok(prepared.text.includes('Voltage gain Av') && !/not ready|earlier version/.test(prepared.text));
  await pressPrint(page);
  assert.deepEqual(await page.evaluate((a) => window.__main.filter((n) => a.includes(n)), ANALYSES), [], 'Print sheet ran no analysis on the main thread');
  const byButton = await page.locator('#sheet').textContent();
  assert.equal(prepared.text, byButton, 'Ctrl+P printed the sheet Print sheet prints');
  await page.evaluate(() => window.dispatchEvent(new Event('beforeprint')));
  assert.equal(await page.locator('#sheet').textContent(), byButton, 'beforeprint rebuilt the same sheet');

  // An edit, then Ctrl+P at once (after the edit's own microtasks, before any pause
  // has passed): the sheet prepared before it, marked in words, and no core call.
  await page.evaluate(async () => {
    HR.design.set('stage', 'r_fb_ohm', '3k3');
    await Promise.resolve();
  });
  const early = await ownPrint(page);
  assert.deepEqual(early.calls, [], 'no core call on the main thread at beforeprint');
  assert.equal(early.state, 'older');
  assert.match(early.text, /Not the design as it is now: this sheet is of an earlier version of it\..*was not ready when printing began/);
  assert.ok(early.text.includes('2k2') && !early.text.includes('3k3'), 'the earlier design’s R fb');
  assert.ok(early.text.includes('Link to this design: none: this sheet is not of the design as it is now'), 'no link to a design it is not');

  // Once prepared (a state, waited for), Ctrl+P (page.pdf fires beforeprint) prints the edit.
  await page.waitForFunction(() => HR.sheet.ready()); // the sheet and the link, made after a pause
  const after = await ownPrint(page);
  assert.deepEqual(after.calls, [], 'no core call on the main thread at beforeprint');
  assert.equal(after.state, 'current');
  await recordMainCalls(page);
  const gain = await page.evaluate(() => HR.fmt(wasm_bindgen.responseReport(HR.design.text()).design.gain_db, 'dB'));
  const edited = await readPdf(await page.pdf({ format: 'A4' }));
  assert.ok(edited.text.includes('3k3') && !edited.text.includes(' 2k2 '), 'the edited R fb is printed');
  assert.ok(edited.text.includes(squash(gain)), `the new gain ${gain}`);
  assert.ok(!/not ready|earlier version/.test(edited.text));
  const { cells } = await coreCells(page);
  assert.deepEqual(cells.filter((c) => !edited.text.includes(c)), []);
  // The sheet's link opens this design: from file://, its end as printed in note 1,
  // put after the page's file name.
  const end = await page.locator('#sheet .note .full').textContent();
  await opensTheDesign(page, end);

  // A bad value: the sheet is of the last good design, and says so, with no core call.
  await page.evaluate(async () => {
    HR.design.set('stage', 'r_fb_ohm', '3k3x');
    await Promise.resolve();
  });
  const refused = await ownPrint(page);
  assert.deepEqual(refused.calls, [], 'no core call on the main thread at beforeprint');
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

// The link's line as printed: `Link to this design (note 1): <start>…`, the start of
// the link on one line (no space in it) and cut (the ellipsis, which NFKC makes three
// dots).
function shortLink(pdf) {
  const m = pdf.text.match(/Link to this design \(note 1\): (\S+?)\.\.\. /);
  assert.ok(m, `a one-line link cut with an ellipsis in: ${pdf.text.slice(-2500, -1500)}`);
  return m[1];
}

test('From file:// the printed link is one line cut to fit, whole in note 1 as the part after the file name, with no folder on paper or in the PDF', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  await pressPrint(page);
  const end = await page.locator('#sheet .note .full').textContent();
  const whole = await page.evaluate(() => HR.documents.link('', () => {}));
  assert.ok(end.startsWith('#stage&d=') && whole.endsWith(end), `note 1 holds the link's end, ${end.slice(0, 40)}…`);
  assert.equal(await page.locator('#sheet a').count(), 0, 'nothing on the sheet links to a file');
  assert.ok(!(await page.locator('#sheet').textContent()).includes(path.dirname(PAGE_PATH)));
  assert.match(await page.locator('#sheet .note').textContent(), /opened from disk.*add this after its file name/);
  for (const format of ['A4', 'Letter']) {
    const pdf = await readPdf(await page.pdf({ format }));
    assert.ok(pdf.pages.length <= 2, `${pdf.pages.length} ${format} pages`);
    const start = shortLink(pdf);
    assert.ok(end.startsWith(start) && start.length >= 20 && start.length < end.length, `${format}: the line is the link's start, cut: ${start}`);
    assert.ok(pdf.text.replace(/\s+/g, '').includes(end), `${format}: note 1 has the whole end of the link, broken over lines`);
    assert.ok(!pdf.text.includes('file:') && !pdf.text.includes(path.dirname(PAGE_PATH)), `${format}: no local path in the text`);
    assert.ok(!Buffer.from(await page.pdf({ format })).toString('latin1').includes(path.dirname(PAGE_PATH)), `${format}: nor in its bytes`);
  }
  // Pasted after the page's file name, the end opens the design.
  await opensTheDesign(page, end);
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('Over http the printed link is the whole address: one line cut to fit, whole in note 1 and a link, which opens the design', async () => {
  const server = http.createServer((req, res) => {
    res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' });
    res.end(fs.readFileSync(PAGE_PATH));
  });
  await new Promise((r) => server.listen(0, '127.0.0.1', r));
  const base = `http://127.0.0.1:${server.address().port}/halfrail.html`;
  try {
    const page = await browser.context.newPage();
    const seen = watch(page, [base]);
    await page.goto(`${base}#stage`);
    await ready(page);
    await page.waitForSelector('#panel-stage[data-computed]');
    await pressPrint(page);
    const full = page.locator('#sheet .note a.full');
    const href = await full.getAttribute('href');
    assert.equal(await full.textContent(), href);
    assert.ok(href.startsWith(`${base}#stage&d=`), href.slice(0, 60));
    const pdf = await readPdf(await page.pdf({ format: 'Letter' }));
    assert.ok(pdf.pages.length <= 2, `${pdf.pages.length} pages`);
    const start = shortLink(pdf);
    assert.ok(href.startsWith(start) && start.length < href.length, `the line is the link's start, cut: ${start}`);
    assert.ok(pdf.text.replace(/\s+/g, '').includes(href), 'note 1 has the whole link');
    const draft = await page.evaluate(() => HR.design.text());
    const other = await browser.context.newPage();
    await other.goto(href);
    await ready(other);
    assert.equal(await other.evaluate(() => HR.design.text()), draft);
    await other.close();
    assert.deepEqual(seen.requests, []);
    assert.deepEqual(seen.errors, []);
    await page.close();
  } finally {
    server.close();
  }
});

test('The printed sheet has a bill of materials: each fitted part with its value, tolerance class and rating, the inverter, and the decoupling marked common practice', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  await pressPrint(page);
  const bom = page.locator('#sheet section').filter({ has: page.locator('h2', { hasText: /^Bill of materials$/ }) });
  assert.deepEqual(await bom.locator('thead th').allTextContents(), ['ref', 'value', 'part', 'tolerance', 'rating']);
  const rows = await bom.locator('tbody tr').evaluateAll((trs) => trs.map((tr) => [...tr.cells].map((c) => c.textContent)));
  const row = (ref) => rows.find((r) => r[0] === ref);
  assert.deepEqual(row('R fb'), ['R fb', '2k2', 'resistor', '±1 % (F)', '≥ 3.47 V'], 'RKM, the tolerance section’s 1 %, the supply’s top');
  assert.deepEqual(row('C in'), ['C in', '100 nF', 'capacitor', '±10 % (K)', '10 V'], '10 V ≥ 2 × 3.47 V');
  assert.deepEqual(row('U1'), ['U1', '1 stage', 'CMOS inverter, unbuffered', '—', 'VDD 3.30 V ±5 %']);
  assert.deepEqual(row('C dec').slice(1), ['100 nF', 'ceramic X7R (common practice)', '±10 % (K)', '10 V']);
  assert.deepEqual(row('C bulk').slice(1), ['10 µF', 'bulk (common practice)', '±20 % (M)', '10 V']);
  assert.equal(row('C fb'), undefined, 'a part not fitted is not bought');
  assert.equal(row('R out'), undefined, 'nor a 0 Ω short');
  assert.match(await bom.textContent(), /Supply decoupling \(common practice, not computed\)/);

  // A tolerance edited on the page: the sheet's classes follow (Ctrl+P, for the design as it is).
  await page.evaluate(() => HR.design.set('tolerance', 'resistor_pct', 5));
  await page.waitForFunction(() => HR.sheet.linkIsCurrent());
  await page.waitForFunction(() => HR.sheet.ready()); // prepared in the background
  const pdf = await readPdf(await page.pdf({ format: 'A4' }));
  assert.ok(pdf.text.includes('Bill of materials'));
  assert.deepEqual((await bom.locator('tbody tr').filter({ hasText: 'R fb' }).locator('td').allTextContents()).slice(3), ['±5 % (J)', '≥ 3.47 V']);
  assert.ok(pdf.text.includes('±5 % (J)') && pdf.text.includes('common practice'));
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

test('The printed sheet has the demo’s crystal oscillator: its figures as the Crystal panel’s report gives them, the parts to buy and its caution, within two pages', async () => {
  const { page, seen } = await openPanel(browser.context, 'stage');
  await pressPrint(page);
  const xtal = page.locator('#sheet section').filter({ has: page.locator('h2', { hasText: /^Crystal oscillator$/ }) });
  assert.equal(await xtal.count(), 1, 'a section of its own');
  const text = await xtal.textContent();
  const figures = await xtal.locator('table').first().locator('tbody tr').evaluateAll((trs) => trs.map((tr) => tr.cells[0].textContent));
  assert.deepEqual(figures, ['Frequency', 'Negative R', 'gm', 'Start-up τ', 'Drive', 'Swing g, o']);
  // The same figures as the Crystal panel's (crystalReport, the same as `halfrail crystal`).
  const shown = await page.evaluate(() => {
    const r = wasm_bindgen.crystalReport(HR.design.text());
    return { pull: `(${r.pull_ppm >= 0 ? '+' : ''}${HR.fixed(r.pull_ppm, 2)} ppm)`, drive: HR.fmt(r.drive_w, 'W'), tau: HR.fmt(r.tau_s, 's'), warnings: r.warnings.length };
  });
  assert.ok(text.includes(shown.pull), `the frequency error ${shown.pull}`);
  assert.ok(text.includes(`${shown.drive} (200 µW rated)`), `the drive ${shown.drive} against the crystal's rating`);
  assert.ok(text.includes(shown.tau), `τ ${shown.tau}`);
  assert.equal(shown.warnings, 0);
  const parts = xtal.locator('table').filter({ has: page.locator('th', { hasText: /^ref$/ }) });
  assert.deepEqual(await parts.locator('thead th').allTextContents(), ['ref', 'value', 'part', 'rating']);
  const rows = await parts.locator('tbody tr').evaluateAll((trs) => trs.map((tr) => [...tr.cells].map((c) => c.textContent)));
  assert.deepEqual(rows.map((r) => r[0]), ['C1', 'C2', 'Rs', 'Rf', 'Y1']);
  assert.deepEqual(rows[4], ['Y1', '12.8 MHz', 'crystal CL 12.0 pF, ESR ≤ 35.0 Ω', '200 µW']);
  assert.deepEqual(rows[0].slice(1), ['15.0 pF', 'C0G ±10 % (K)', '10 V']);
  const cautions = page.locator('#sheet section').filter({ has: page.locator('h2', { hasText: /^Before you build$/ }) });
  assert.match(await cautions.textContent(), /Oscillator: C1, C2 in C0G, next to the part with Y1 over a ground plane/);
  for (const format of ['A4', 'Letter']) {
    const pdf = await readPdf(await page.pdf({ format }));
    assert.ok(pdf.pages.length <= 2, `${pdf.pages.length} ${format} pages`);
    for (const t of ['Crystal oscillator', shown.pull, 'crystal CL 12.0 pF, ESR ≤ 35.0 Ω', 'Oscillator: C1, C2 in C0G']) {
      assert.ok(pdf.text.includes(squash(t)), `${format}: the PDF has “${t}”`);
    }
  }
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
});

// Every label drawn on the sheet's plots (their boxes, in the image's pixels): none
// meets another, each lies in the image, the marks' stand above the plot area (no
// curve there) and the levels' where no curve passes.
async function plotLabels(page) {
  const figures = await page.locator('#sheet img[data-labels]').evaluateAll((imgs) => imgs.map((i) => ({ ...JSON.parse(i.dataset.labels), w: i.naturalWidth, h: i.naturalHeight })));
  assert.equal(figures.length, 2, 'the two plots');
  for (const { plot, labels, w, h } of figures) {
    for (const [i, a] of labels.entries()) {
      assert.ok(a.x0 >= 0 && a.x1 <= w && a.y0 >= 0 && a.y1 <= h, `${a.text} inside the image`);
      assert.ok(a.clear, `${a.text} clear of the curves`);
      for (const b of labels.slice(i + 1)) {
        assert.ok(!(a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1), `${a.text} and ${b.text} overlap`);
      }
    }
    for (const m of labels.filter((l) => !/=/.test(l.text))) assert.ok(m.y1 <= plot.top, `${m.text} above the plot`);
  }
  return figures;
}

test('The sheet’s plot labels meet neither each other nor a curve, where the marks crowd too', async () => {
  const { page, seen } = await openPanel(browser.context, 'response');
  await pressPrint(page);
  const [gain, loop] = await plotLabels(page);
  assert.deepEqual(gain.labels.map((l) => l.text).sort(), ['f_design', 'f_high', 'f_low']);
  assert.ok(loop.labels.some((l) => l.text === 'crossover') && loop.labels.some((l) => l.text === '|T| = 1'));
  // f_design beside f_low: their labels take two rows.
  await page.evaluate(() => HR.design.set('analysis', 'f_design_hz', '5 kHz'));
  await page.waitForFunction(() => HR.sheet.linkIsCurrent());
  await page.waitForFunction(() => HR.sheet.ready()); // prepared in the background
  const pdf = await readPdf(await page.pdf({ format: 'A4' }));
  assert.ok(pdf.pages.length <= 2 && pdf.images >= 3);
  const [crowded] = await plotLabels(page);
  const at = (t) => crowded.labels.find((l) => l.text === t);
  assert.notEqual(at('f_low').y1, at('f_design').y1, 'f_low and f_design in rows of their own');
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
});
