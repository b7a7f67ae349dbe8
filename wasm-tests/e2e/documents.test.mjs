// The page's design documents in Chromium from file://: Save downloads the draft
// (which `halfrail check` accepts) and Open (the file picker or a dropped file) loads
// it back as one undoable step; a bad file (a bad value, a newer format, not JSON,
// over 4 MiB) is refused with the field and the file named and the design kept; a
// stored draft the page cannot read is kept aside and offered for download; the link
// holds the whole design and opens it exactly, a damaged one is refused; the demo asks
// first; embedded in a frame the chrome is compact and the height is posted, and the
// read-only view has nothing to edit. No test sees a network request.
import { test, before, after, beforeEach } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'fs';
import os from 'os';
import path from 'path';
import { execFileSync } from 'child_process';
import { launch, watch, ready, clearStorage, PAGE_PATH, PAGE_URL, CLI_PATH, framesDrawn, undoButton } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); });
after(async () => { await browser.close(); });
beforeEach(() => clearStorage(browser.context));

const PREFIX = 'halfrail.v1.';
const DEMO = JSON.parse(fs.readFileSync(path.resolve(path.dirname(PAGE_PATH), '..', 'src', 'doc', 'demo.halfrail.json'), 'utf8'));

async function open(hash = '#stage', { init } = {}) {
  const page = await browser.context.newPage();
  const seen = watch(page);
  if (init) await page.addInitScript(init);
  await page.goto(PAGE_URL + hash);
  await ready(page);
  return { page, seen };
}
const draft = (page) => page.evaluate(() => JSON.parse(HR.design.text()));
const edit = (page, section, key, value) => page.evaluate(([s, k, v]) => HR.design.set(s, k, v), [section, key, value]);
const status = (page) => page.locator('#engine-status').textContent();
const bar = (page, name) => page.locator('#docbar').getByRole('button', { name, exact: true });
const notice = (page) => page.locator('.notice').last();
const clean = async (page, seen) => {
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
  await page.close();
};
// Writes storage entries, so the next page starts on them.
const stored = (entries) => clearStorage(browser.context, entries);
// Opens files with the page's file picker (the Open button), or a dropped file.
async function pick(page, files) {
  const [chooser] = await Promise.all([page.waitForEvent('filechooser'), bar(page, 'Open…').click()]);
  await chooser.setFiles(files);
}
const file = (name, text) => ({ name, mimeType: 'application/json', buffer: Buffer.from(text) });

test('Save downloads the draft, the CLI accepts it, and Open brings it back as one undoable step', async () => {
  const { page, seen } = await open('#stage');
  await edit(page, 'stage', 'r_fb_ohm', '3k3');
  const [download] = await Promise.all([page.waitForEvent('download'), bar(page, 'Save').click()]);
  // The name comes from the demo's title.
  assert.equal(download.suggestedFilename(), 'Demo-10.7-MHz-IF-gain-block-for-a-small-lab-receiver.halfrail.json');
  const saved = fs.readFileSync(await download.path(), 'utf8');
  assert.deepEqual(JSON.parse(saved), await draft(page));
  assert.match(saved, /^\{\n {2}"halfrail": 1,\n/, 'pretty JSON');
  assert.match(await status(page), /^Saved Demo-/);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'halfrail-save-'));
  const copy = path.join(dir, 'saved.halfrail.json');
  fs.writeFileSync(copy, saved);
  assert.match(execFileSync(CLI_PATH, ['check', copy], { encoding: 'utf8' }), /valid halfrail document/);

  await edit(page, 'stage', 'r_fb_ohm', '10k');
  await pick(page, copy);
  await page.waitForFunction(() => HR.design.get('stage', 'r_fb_ohm') === '3k3');
  assert.deepEqual(await draft(page), JSON.parse(saved));
  assert.equal(await status(page), 'Opened saved.halfrail.json — Undo brings back your previous design.');
  // The schematic shows it, and one undo brings back the design before.
  await page.waitForFunction(() => document.querySelector('#panel-stage .value[data-key="r_fb_ohm"]').textContent.includes('3k3'));
  await undoButton(page).click();
  assert.equal(await page.evaluate(() => HR.design.get('stage', 'r_fb_ohm')), '10k');
  fs.rmSync(dir, { recursive: true, force: true });
  await clean(page, seen);
});

test('a file dropped on the page opens, with a hint while it is dragged', async () => {
  const { page, seen } = await open('#stage');
  const doc = { ...DEMO, title: 'Dropped', stage: { ...DEMO.stage, r_in_ohm: '330R' } };
  await page.evaluate((text) => {
    const dt = new DataTransfer();
    dt.items.add(new File([text], 'dropped.halfrail.json', { type: 'application/json' }));
    window.__dt = dt;
    document.body.dispatchEvent(new DragEvent('dragenter', { dataTransfer: dt, bubbles: true, cancelable: true }));
  }, JSON.stringify(doc));
  const hint = page.locator('.drop-hint');
  assert.equal(await hint.isVisible(), true);
  assert.match(await hint.textContent(), /Drop a design file/);
  const stopped = await page.evaluate(() => {
    const over = new DragEvent('dragover', { dataTransfer: window.__dt, bubbles: true, cancelable: true });
    document.body.dispatchEvent(over);
    const drop = new DragEvent('drop', { dataTransfer: window.__dt, bubbles: true, cancelable: true });
    document.body.dispatchEvent(drop);
    return over.defaultPrevented && drop.defaultPrevented;
  });
  assert.equal(stopped, true, 'the browser does not open the file in place of the page');
  await page.waitForFunction(() => HR.design.get('stage', 'r_in_ohm') === '330R');
  assert.deepEqual(await draft(page), doc);
  assert.equal(await hint.isVisible(), false);
  assert.match(await status(page), /^Opened dropped\.halfrail\.json/);
  await clean(page, seen);
});

test('a bad file is refused with the field and the file named, and the design is kept', async () => {
  const { page, seen } = await open('#stage');
  await edit(page, 'stage', 'r_fb_ohm', '2k7');
  const before = await draft(page);
  const cases = [
    ['bad-value.halfrail.json', JSON.stringify({ ...DEMO, stage: { ...DEMO.stage, r_fb_ohm: -3300 } }), /R fb: must be > 0, got -3300/],
    ['newer.halfrail.json', JSON.stringify({ ...DEMO, halfrail: 2 }), /Format version: this document is format version 2, newer than this build reads \(1\)/],
    ['notes.txt', 'these are not JSON', /document: is not a JSON object/],
    ['list.json', '[1]', /document: is not a JSON object/],
    ['huge.halfrail.json', `{"halfrail": 1, "notes": "${'x'.repeat(4 << 20)}"}`, /document: is 4194\d{3} bytes; at most 4194304 are accepted/],
  ];
  for (const [name, text, reason] of cases) {
    await pick(page, file(name, text));
    // One notice at a time: this file's takes the place of the last one's.
    await page.waitForFunction((n) => document.querySelector('.notice')?.textContent.startsWith(`${n} was not opened`), name);
    assert.equal(await page.locator('.notice').count(), 1);
    const message = await notice(page).textContent();
    assert.ok(message.startsWith(`${name} was not opened — `), message);
    assert.match(message, reason);
    assert.match(message, /Your design is unchanged/);
    assert.deepEqual(await draft(page), before, name);
  }
  await notice(page).getByRole('button', { name: 'Dismiss' }).click();
  assert.equal(await page.locator('.notice').count(), 0);
  assert.equal(await page.evaluate(() => HR.design.undoLabel()), 'R fb 2k2 → 2k7', 'no step was added');
  await clean(page, seen);
});

test('an older format is brought up by the core\'s migration between reading and checking, and the user is told', async () => {
  const { page, seen } = await open('#stage');
  // This build has no older format: its core refuses version 0 by name.
  assert.deepEqual(await page.evaluate(() => HR.call('migrateDocument', '{"halfrail": 0}').error.field), 'halfrail');
  assert.equal(await page.evaluate(() => HR.call('migrateDocument', '{"halfrail": 1, "title": "x"}').ok), '{"halfrail": 1, "title": "x"}');
  // A stand-in for a future step from an older format: version 0 named the section `amp`.
  await page.evaluate(() => {
    wasm_bindgen.migrateDocument = (text) => {
      const { halfrail, amp, ...rest } = JSON.parse(text);
      if (halfrail !== 0) return text;
      return JSON.stringify({ halfrail: 1, ...rest, stage: amp });
    };
  });
  await pick(page, file('old.halfrail.json', JSON.stringify({ halfrail: 0, amp: { ...DEMO.stage, r_fb_ohm: '1k5' } })));
  await page.waitForFunction(() => HR.design.get('stage', 'r_fb_ohm') === '1k5');
  assert.deepEqual(await draft(page), { halfrail: 1, stage: { ...DEMO.stage, r_fb_ohm: '1k5' } });
  assert.match(await status(page), /^Opened old\.halfrail\.json — .*\(brought up from format 0 to 1; saving writes the new format\)$/);
  await clean(page, seen);
});

test('a stored draft the page cannot read is kept aside, offered for download, and the page starts on the demo', async () => {
  for (const [raw, why] of [
    ['{"draft": {"halfrail": 1, "stage": {"r_fb_ohm": "4k7"', /not JSON/],
    [JSON.stringify({ draft: { ...DEMO, halfrail: 2 }, good: null }), /format version 2, newer than this build reads/],
    [JSON.stringify({ draft: { ...DEMO, stage: 5 } }), /not a design draft/],
  ]) {
    await stored({ [`${PREFIX}design`]: raw });
    const { page, seen } = await open('#stage');
    const n = notice(page);
    assert.match(await n.textContent(), /The design stored in this browser could not be read/);
    assert.match(await n.textContent(), why);
    assert.deepEqual(await draft(page), DEMO);
    const [download] = await Promise.all([page.waitForEvent('download'), n.getByRole('button', { name: 'Download the stored text' }).click()]);
    assert.equal(fs.readFileSync(await download.path(), 'utf8'), raw);
    // An edit saves over the stored draft, and the text is still kept aside, across a reload.
    await edit(page, 'stage', 'r_fb_ohm', '3k9');
    const kept = () => page.evaluate((k) => JSON.parse(localStorage.getItem(k)), `${PREFIX}recovered`);
    assert.deepEqual((await kept()).map((r) => r.text), [raw]);
    await page.reload();
    await ready(page);
    assert.equal(await page.locator('.notice').count(), 1);
    assert.equal(await page.evaluate(() => HR.design.get('stage', 'r_fb_ohm')), '3k9');
    await notice(page).getByRole('button', { name: 'Dismiss' }).click();
    assert.equal(await kept(), null);
    await clean(page, seen);
  }
});

test('a stored draft with a bad value is a draft, and loads as it is', async () => {
  const bad = { ...DEMO, stage: { ...DEMO.stage, r_fb_ohm: '-3k3' }, part: { ...DEMO.part, vdd_v: undefined } };
  await stored({ [`${PREFIX}design`]: JSON.stringify({ draft: bad, good: null }) });
  const { page, seen } = await open('#stage');
  assert.deepEqual(await draft(page), JSON.parse(JSON.stringify(bad)));
  assert.equal(await page.locator('.notice').count(), 0);
  // It saves as it is (with a word that it will not open until fixed), and no link is made of it.
  const [download] = await Promise.all([page.waitForEvent('download'), bar(page, 'Save').click()]);
  assert.deepEqual(JSON.parse(fs.readFileSync(await download.path(), 'utf8')), JSON.parse(JSON.stringify(bad)));
  assert.match(await status(page), /still has a bad value \(Part: missing field “Supply Vdd”\)/);
  await bar(page, 'Copy link').click();
  assert.match(await status(page), /A link would not open while Part is bad/);
  await clean(page, seen);
});

// A page whose clipboard keeps what is written to it (or refuses, with `refuse`).
const clipboard = (refuse) => {
  Object.defineProperty(navigator, 'clipboard', { configurable: true, value: {
    writeText: async (text) => { if (refuse) throw new DOMException('not allowed', 'NotAllowedError'); window.__copied = text; },
  } });
};
async function copiedLink(page) {
  await bar(page, 'Copy link').click();
  await page.waitForFunction(() => window.__copied);
  assert.equal(await status(page), 'Link copied: it holds the whole design.');
  return page.evaluate(() => window.__copied);
}

test('the link holds the whole design, opens it exactly as one undoable step, and leaves the address', async () => {
  const { page, seen } = await open('#loop', { init: clipboard });
  await edit(page, 'stage', 'r_fb_ohm', '3k3');
  await edit(page, 'part', 'vdd_v', '5 V');
  await page.evaluate(() => HR.design.replace('title', 'Bänd-pass & “link” test — 中文', 'title'));
  const design = await draft(page);
  const link = await copiedLink(page);
  assert.ok(link.startsWith(`${PAGE_URL}#loop&d=`), link);
  assert.match(link.split('&d=')[1], /^[A-Za-z0-9_-]+$/, 'base64url');
  // The saved design moves on before the link is opened.
  await edit(page, 'stage', 'r_fb_ohm', '4k7');
  const mine = await draft(page);
  await page.close();

  const other = await browser.context.newPage();
  const seen2 = watch(other);
  await other.goto(link);
  await ready(other);
  assert.deepEqual(await draft(other), design);
  assert.equal(await other.evaluate(() => HR.design.text()), JSON.stringify(design), 'the same text, key order and all');
  assert.equal(await status(other), 'Opened the design in the link — Undo brings back your previous design.');
  assert.equal(await other.locator('#panel-loop').isVisible(), true, 'the panel of the link is shown');
  assert.equal(await other.evaluate(() => location.hash), '#loop', 'the design is taken out of the address');
  await other.evaluate(() => HR.design.undo());
  assert.deepEqual(await draft(other), mine);
  // A reload keeps the edits made since (the link's design is not opened again).
  await other.evaluate(() => HR.design.redo());
  await edit(other, 'stage', 'r_in_ohm', '270R');
  await other.reload();
  await ready(other);
  assert.equal(await other.evaluate(() => HR.design.get('stage', 'r_in_ohm')), '270R');
  assert.equal(await other.locator('.notice').count(), 0);
  // A link pasted into the address of the open page (only the fragment changes) opens too.
  await other.evaluate((hash) => { location.hash = hash; }, link.slice(link.indexOf('#')));
  await other.waitForFunction(() => HR.design.get('stage', 'r_in_ohm') !== '270R');
  assert.deepEqual(await draft(other), design);
  assert.equal(await other.evaluate(() => location.hash), '#loop');
  assert.deepEqual(seen.requests, []);
  assert.deepEqual(seen.errors, []);
  await clean(other, seen2);
});

test('a cut-short or bad link is refused politely and the saved design kept', async () => {
  const { page, seen } = await open('#stage', { init: clipboard });
  await edit(page, 'stage', 'r_fb_ohm', '5k6');
  const link = await copiedLink(page);
  await edit(page, 'stage', 'r_fb_ohm', '6k8');
  const mine = await draft(page);
  // A link of a newer format's document, made the way the page makes one.
  const newer = await page.evaluate(async (text) => {
    const bytes = new Uint8Array(await new Response(new Blob([text]).stream().pipeThrough(new CompressionStream('deflate-raw'))).arrayBuffer());
    return btoa(String.fromCharCode(...bytes)).replace(/\+/g, '-').replace(/\//g, '_').replace(/=+$/, '');
  }, JSON.stringify({ halfrail: 2 }));
  await clean(page, seen);
  for (const [url, message] of [
    [link.slice(0, -12), /^The design in this link is damaged or cut short, so it was not opened\. Your own design is kept\./],
    [link.slice(0, -1), /damaged or cut short/],
    [`${PAGE_URL}#stage&d=not*base64`, /damaged or cut short/],
    [`${PAGE_URL}#stage&d=${newer}`, /^The design in the link was not opened — Format version: this document is format version 2/],
  ]) {
    const other = await browser.context.newPage();
    const seen2 = watch(other);
    await other.goto(url);
    await ready(other);
    assert.match(await notice(other).textContent(), message, url);
    assert.deepEqual(await draft(other), mine);
    assert.equal(await other.evaluate(() => HR.design.canUndo()), false);
    await clean(other, seen2);
  }
});

test('a design too long for a link says so; without a clipboard the link is shown to copy', async () => {
  const { page, seen } = await open('#stage', { init: () => { Object.defineProperty(navigator, 'clipboard', { value: undefined }); } });
  await bar(page, 'Copy link').click();
  const dialog = page.getByRole('dialog', { name: 'Link to this design' });
  await dialog.waitFor();
  const field = dialog.getByRole('textbox', { name: 'Link' });
  assert.equal(await field.getAttribute('readonly'), '');
  assert.match(await field.inputValue(), /#stage&d=[A-Za-z0-9_-]+$/);
  await dialog.getByRole('button', { name: 'Close' }).click();
  assert.equal(await dialog.count(), 0);
  // Incompressible notes make the link longer than 8000 characters.
  await page.evaluate(() => HR.design.replace('notes', [...crypto.getRandomValues(new Uint8Array(8000))].map((b) => b.toString(36)).join(''), 'notes'));
  await bar(page, 'Copy link').click();
  await page.waitForFunction(() => /too long/.test(document.getElementById('engine-status').textContent)); // said once the link is made
  assert.match(await status(page), /^This design is too long for a link \(\d+ characters; at most 8000\): save it as a file instead\.$/);
  assert.equal(await page.getByRole('dialog').count(), 0);
  await clean(page, seen);
});

test('Load the demo asks first when the design differs, and is undoable', async () => {
  const { page, seen } = await open('#stage');
  await bar(page, 'Load the demo').click();
  assert.equal(await status(page), 'This is the demo design already.');
  assert.equal(await page.getByRole('dialog').count(), 0);
  await edit(page, 'stage', 'r_fb_ohm', '8k2');
  await bar(page, 'Load the demo').click();
  const dialog = page.getByRole('dialog', { name: 'Load the demo design?' });
  await dialog.waitFor();
  // The safe answer has the focus; Escape and "Keep my design" change nothing.
  assert.equal(await page.evaluate(() => document.activeElement.textContent), 'Keep my design');
  await page.keyboard.press('Escape');
  assert.equal(await dialog.count(), 0);
  await bar(page, 'Load the demo').click();
  await dialog.getByRole('button', { name: 'Keep my design' }).click();
  assert.equal(await page.evaluate(() => HR.design.get('stage', 'r_fb_ohm')), '8k2');
  await bar(page, 'Load the demo').click();
  await dialog.getByRole('button', { name: 'Load the demo' }).click();
  await page.waitForFunction(() => HR.design.get('stage', 'r_fb_ohm') === '2k2');
  assert.deepEqual(await draft(page), DEMO);
  assert.match(await status(page), /Undo brings back your previous design/);
  await page.evaluate(() => HR.design.undo());
  assert.equal(await page.evaluate(() => HR.design.get('stage', 'r_fb_ohm')), '8k2');
  await clean(page, seen);
});

test('the Design bar is reachable by keyboard with visible focus', async () => {
  const { page, seen } = await open('#stage');
  await page.locator('.skip').focus();
  const names = [];
  for (let i = 0; i < 5; i += 1) {
    await page.keyboard.press('Tab');
    names.push(await page.evaluate(() => document.activeElement.textContent));
  }
  assert.deepEqual(names, ['Save', 'Open…', 'Copy link', 'Embed…', 'Load the demo']);
  assert.notEqual(await page.evaluate(() => getComputedStyle(document.activeElement).outlineStyle), 'none');
  assert.equal(await page.getByRole('group', { name: 'Design document' }).count(), 1);
  await clean(page, seen);
});

// The Embed dialog's markup for the current design, with its frame's address pointed
// at a copy of the page in a host directory, and the host page written around it.
async function host(variant, { extra = '' } = {}) {
  const { page, seen } = await open('#response');
  await edit(page, 'stage', 'r_fb_ohm', '3k9');
  const design = await draft(page);
  await bar(page, 'Embed…').click();
  const dialog = page.getByRole('dialog', { name: 'Embed this design' });
  const markup = await dialog.getByRole('textbox', { name: variant }).inputValue();
  for (const other of ['Editable', 'Read only']) {
    assert.equal(await dialog.getByRole('textbox', { name: other }).getAttribute('readonly'), '');
  }
  await clean(page, seen);
  assert.ok(markup.includes(`src="${PAGE_URL}#response&embed`), markup);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'halfrail-embed-'));
  fs.copyFileSync(PAGE_PATH, path.join(dir, 'halfrail.html'));
  const file = path.join(dir, 'wiki.html');
  fs.writeFileSync(file, `<!doctype html><meta charset="utf-8"><title>host</title><h1>Lab wiki</h1>
<script>window.heights = []; addEventListener('message', (e) => window.heights.push(e.data));</script>
${markup.split(PAGE_URL).join('halfrail.html')}${extra}`);
  return { dir, file, design, frameUrl: `file://${path.join(dir, 'halfrail.html')}` };
}

// The host page of `host(label)` opened, once its frame has started and shows the
// link's design.
async function openHost(label) {
  const { dir, file, design, frameUrl } = await host(label);
  const page = await browser.context.newPage();
  const seen = watch(page, [`file://${file}`, frameUrl]);
  await page.goto(`file://${file}`);
  const frame = page.frameLocator('#halfrail');
  await frame.locator('html[data-ready="true"]').waitFor({ timeout: 15000 });
  const inner = await (await page.locator('#halfrail').elementHandle()).contentFrame();
  assert.deepEqual(JSON.parse(await inner.evaluate(() => HR.design.text())), design);
  return { dir, design, page, seen, frame, inner };
}

test('embedded in a frame: compact chrome, the cautions as one line, the height posted to the host', async () => {
  const { dir, design, page, seen, frame, inner } = await openHost('Editable');
  assert.equal(await frame.locator('#engine-status').textContent(), 'Showing the design in the link; changes stay in this frame.');
  await frame.locator('#panel-response[data-computed]').waitFor();
  // Compact: no tagline, the rail one row above the panel, the cautions one line that opens.
  assert.equal(await frame.locator('.tagline').isVisible(), false);
  const rail = await frame.locator('#rail').boundingBox();
  const main = await frame.locator('#main').boundingBox();
  assert.ok(rail.height < 60 && main.y >= rail.y + rail.height - 1, JSON.stringify({ rail, main }));
  const brief = frame.locator('.cautions .brief');
  assert.equal(await brief.isVisible(), true);
  assert.match(await brief.textContent(), /ratings and dissipation; every figure is a model estimate/);
  const full = frame.locator('.cautions > p').nth(1);
  assert.equal(await full.isVisible(), false);
  await brief.getByRole('button', { name: 'All cautions' }).click();
  assert.equal(await full.isVisible(), true);
  assert.match(await full.textContent(), /absolute maximum ratings/);
  assert.equal(await brief.getByRole('button').getAttribute('aria-expanded'), 'true');
  // The host hears the page's height and sizes the frame to it (the snippet's listener).
  // (From file:// the frame is another origin: its own script measures the body.)
  await page.waitForFunction(() => {
    const h = window.heights.filter((m) => m && m.type === 'halfrail-height').pop();
    return h && document.getElementById('halfrail').style.height === `${h.height}px`;
  });
  const body = await inner.evaluate(() => Math.ceil(document.body.getBoundingClientRect().height));
  assert.equal((await page.evaluate(() => window.heights)).pop().height, body);
  const heights = await page.evaluate(() => window.heights);
  assert.ok(heights.every((m) => m.type === 'halfrail-height' && Number.isInteger(m.height) && m.height > 0), JSON.stringify(heights));
  assert.ok(heights[heights.length - 1].height > 600, 'the whole Response panel');
  // The frame settles at its height (it does not grow with the frame it is given).
  const settled = heights.length;
  await framesDrawn(inner, 4);
  await framesDrawn(page, 2);
  assert.equal((await page.evaluate(() => window.heights)).length, settled);
  // The rail's links keep embed mode and the link's design; the frame's design is not stored.
  assert.match(await frame.locator('#rail a[data-panel="loop"]').getAttribute('href'), /^#loop&embed&d=[A-Za-z0-9_-]+$/);
  await inner.evaluate(() => HR.design.set('stage', 'r_fb_ohm', '12k'));
  assert.equal(await inner.evaluate(() => HR.design.get('stage', 'r_fb_ohm')), '12k');
  const kept = await inner.evaluate((k) => JSON.parse(localStorage.getItem(k)).draft.stage.r_fb_ohm, `${PREFIX}design`);
  assert.equal(kept, '3k9');
  await clean(page, seen);
  fs.rmSync(dir, { recursive: true, force: true });
});

test('the read-only view shows the design and its figures with nothing to edit', async () => {
  const { dir, design, page, seen, frame, inner } = await openHost('Read only');
  assert.equal(await frame.locator('#engine-status').textContent(), 'Showing the design in the link, read only.');
  await frame.locator('#panel-response[data-computed]').waitFor();
  assert.ok(await frame.locator('#panel-response canvas').count() > 0, 'the plots are drawn');
  // Only Save, Copy link and Print sheet in the Design bar.
  assert.deepEqual(await frame.locator('#docbar button').allTextContents(), ['Save', 'Copy link', 'Print sheet']);
  // Every panel, once shown: no input takes typing, no edit control shows.
  for (const id of ['brief', 'part', 'stage', 'loop', 'swing', 'spread', 'chain', 'bench', 'response']) {
    await frame.locator(`#rail a[data-panel="${id}"]`).click();
    // Each panel's first figures (the Bench panel computes only on demand).
    await frame.locator(id === 'bench' ? '#panel-bench' : `#panel-${id}[data-computed]`).waitFor();
  }
  await frame.locator('#panel-stage .value').first().waitFor({ state: 'attached' });
  const editable = await inner.evaluate(() => [...document.querySelectorAll('input, select, textarea')]
    .filter((n) => !n.disabled && !n.readOnly && n.type !== 'hidden').map((n) => n.outerHTML.slice(0, 120)));
  assert.deepEqual(editable, []);
  assert.ok(await inner.evaluate(() => document.querySelectorAll('#main input[readonly]').length) > 10);
  // The buttons left are those that show, compute or export; none that edits (the
  // chain's add, move and remove among them) is left on show.
  const shown = await inner.evaluate(() => [...new Set([...document.querySelectorAll('#main button')]
    .filter((b) => !b.hidden && !b.disabled).map((b) => b.textContent.trim()))].sort());
  const VIEWING = ['Cancel', 'Compute now', 'Compute the reference too', 'Design', 'Fit the part', 'Near −1', 'PNG', 'Save as CSV'];
  assert.deepEqual(shown.filter((t) => !VIEWING.includes(t)), [], `buttons on show: ${shown}`);
  assert.ok(shown.includes('PNG') && shown.includes('Save as CSV'), `exports stay: ${shown}`);
  assert.equal(await inner.evaluate(() => document.querySelectorAll('#panel-chain tbody button:not([hidden])').length), 0, 'no block can be moved or removed');
  assert.equal(await inner.evaluate(() => [...document.querySelectorAll('#panel-stage .value')].every((b) => b.disabled)), true);
  // The design refuses changes too (undo included), and a dropped file is not opened.
  const after = await inner.evaluate(() => {
    HR.design.set('stage', 'r_fb_ohm', '1k');
    HR.design.setMany('stage', { r_in_ohm: '1k' }, 'x');
    HR.design.replace('part', {}, 'x');
    HR.design.undo();
    const dt = new DataTransfer();
    dt.items.add(new File(['{"halfrail": 1}'], 'x.json'));
    document.body.dispatchEvent(new DragEvent('drop', { dataTransfer: dt, bubbles: true, cancelable: true }));
    return HR.design.text();
  });
  await framesDrawn(inner);
  assert.deepEqual(JSON.parse(after), design);
  assert.deepEqual(JSON.parse(await inner.evaluate(() => HR.design.text())), design);
  assert.match(await frame.locator('#rail a[data-panel="loop"]').getAttribute('href'), /^#loop&embed=view&d=/);
  await clean(page, seen);
  fs.rmSync(dir, { recursive: true, force: true });
});
