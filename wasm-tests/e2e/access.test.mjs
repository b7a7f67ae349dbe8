// Accessibility of every panel (Brief, Part, Stage, Response, Loop, Swing, Spread, Chain,
// Bench) in the light and the dark theme, in Chromium from file://:
// - every input, select, textarea, button, link and focusable figure has an accessible
//   name — Chromium's own (the accessibility tree, read through the DevTools protocol);
// - every one of them that takes focus is reached by Tab (the tab order walked with the
//   keyboard), and shows a focus indicator when it has it: an outline or a shadow that
//   it does not have without focus, at least 3:1 against what is behind it (WCAG 2.x,
//   non-text contrast);
// - the text of every visible element with text of its own, and of every field, has a
//   contrast of at least 4.5:1 (3:1 for large text: 24 px, or bold and 18.66 px) against
//   the background it is drawn on — the first opaque background up its ancestors, with
//   translucent ones and opacity composited — by the WCAG 2.x relative-luminance
//   formula. Text drawn on a canvas is not checked (the DOM around it is); disabled
//   controls are exempt, as WCAG exempts inactive components;
// - no text shows a raw number (a float's full digits or an exponent): numbers read in
//   the notation of SPEC §3.4.
// The same checks run on a field with a bad value, its stale figures and the status
// line's problem, on the Embed dialog, a notice, the drop hint and embed mode.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import { launch, watch, ready, clearStorage, PAGE_URL } from './browser.mjs';

let browser;
before(async () => { browser = await launch(); await clearStorage(browser.context); });
after(async () => { await browser.close(); });

const PANELS = ['brief', 'part', 'stage', 'response', 'loop', 'swing', 'spread', 'chain', 'crystal', 'bench'];

// In the page: marks the interactive elements of `root` (data-ax = an index) and audits
// what shows — contrast of text, the unfocused look of each control, raw numbers.
// Returns {controls: [{i, what, tabbable}], contrast: [failures], raw: [texts]}.
function audit(rootSelector) {
  const root = document.querySelector(rootSelector) || document.body;
  for (const n of document.querySelectorAll('[data-ax]')) delete n.dataset.ax;
  const probe = document.createElement('canvas').getContext('2d', { willReadFrequently: true });
  const colours = new Map();
  // Any CSS colour as [r, g, b, a] (0…255, a 0…1), through a canvas.
  const rgba = (css) => {
    if (!colours.has(css)) {
      probe.clearRect(0, 0, 1, 1);
      probe.fillStyle = '#000';
      probe.fillStyle = css;
      probe.fillRect(0, 0, 1, 1);
      const [r, g, b, a] = probe.getImageData(0, 0, 1, 1).data;
      colours.set(css, a === 0 ? [0, 0, 0, 0] : [r * 255 / a, g * 255 / a, b * 255 / a, a / 255].map((v, k) => (k < 3 ? Math.min(255, v) : v)));
    }
    return colours.get(css);
  };
  const over = (top, a, under) => top.slice(0, 3).map((c, k) => c * a + under[k] * (1 - a));
  const luminance = ([r, g, b]) => {
    const lin = (c) => { const s = c / 255; return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4; };
    return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
  };
  const ratio = (x, y) => { const [a, b] = [luminance(x), luminance(y)].sort((p, q) => q - p); return (a + 0.05) / (b + 0.05); };
  // The colour behind `el`'s content: the backgrounds of it and its ancestors composited
  // from the page's canvas (white) up, each faded by the opacity of its group.
  const chain = (el) => { const out = []; for (let n = el; n && n.nodeType === 1; n = n.parentElement) out.push(n); return out.reverse(); };
  const opacity = (el) => chain(el).reduce((o, n) => o * Number(getComputedStyle(n).opacity), 1);
  const behind = (el) => {
    let c = [255, 255, 255];
    for (const n of chain(el)) {
      const b = rgba(getComputedStyle(n).backgroundColor);
      if (b[3] > 0) c = over(b, b[3] * opacity(n), c);
    }
    return c;
  };
  const visible = (el) => el.getClientRects().length > 0 && getComputedStyle(el).visibility === 'visible';
  const describe = (el) => {
    const label = el.getAttribute('aria-label') || el.textContent.trim().slice(0, 40) || el.value || '';
    const panel = el.closest('.panel');
    return `${panel ? `${panel.dataset.panel}: ` : ''}${el.tagName.toLowerCase()}${el.className && typeof el.className === 'string' ? `.${el.className.split(' ')[0]}` : ''} “${label}”`;
  };

  const FOCUSABLE = 'input, select, textarea, button, a[href], [tabindex], summary';
  // Chromium lets Tab reach a scrolled box with nothing focusable inside: listed so its
  // focus indicator is checked when Tab reaches it (named and reached as Chromium decides).
  const scroller = (el) => /auto|scroll/.test(getComputedStyle(el).overflowX + getComputedStyle(el).overflowY)
    && (el.scrollWidth > el.clientWidth || el.scrollHeight > el.clientHeight) && !el.matches(FOCUSABLE);
  const controls = [];
  for (const el of root.querySelectorAll('*')) {
    if (!el.matches(FOCUSABLE) && !(['DIV', 'SECTION', 'FIGURE'].includes(el.tagName) && scroller(el))) continue;
    if (!visible(el) || el.type === 'hidden') continue;
    const loose = !el.matches(FOCUSABLE);
    const i = controls.length;
    el.dataset.ax = String(i);
    const s = getComputedStyle(el);
    controls.push({
      i, what: describe(el),
      tabbable: !loose && el.tabIndex >= 0 && !el.disabled && !el.closest('[inert]'),
      named: !loose && !el.matches('[tabindex="-1"]'),
      rest: `${s.outlineStyle} ${s.outlineWidth} ${s.outlineColor} | ${s.boxShadow}`,
    });
  }

  const contrast = [];
  const raw = [];
  const check = (el, text) => {
    if (el.closest('button:disabled, input:disabled, select:disabled, textarea:disabled, option, .sheet')) return;
    const s = getComputedStyle(el);
    const px = parseFloat(s.fontSize);
    const large = px >= 24 || (Number(s.fontWeight) >= 700 && px >= 18.66);
    const bg = behind(el);
    const fg = rgba(s.color);
    const seen = over(fg, fg[3] * opacity(el), bg);
    const r = ratio(seen, bg);
    const need = large ? 3 : 4.5;
    if (r < need - 1e-9) {
      contrast.push(`${describe(el)}: ${r.toFixed(2)}:1 < ${need}:1 (text ${s.color}${opacity(el) < 1 ? ` at opacity ${opacity(el).toFixed(2)}` : ''} on ${bg.map(Math.round).join(',')}${large ? ', large' : ''}) “${text.slice(0, 50)}”`);
    }
  };
  const walker = document.createTreeWalker(root, NodeFilter.SHOW_ELEMENT);
  for (let el = walker.currentNode; el; el = walker.nextNode()) {
    if (['SCRIPT', 'STYLE', 'CANVAS', 'OPTION'].includes(el.tagName) || !visible(el)) continue;
    const own = [...el.childNodes].filter((n) => n.nodeType === 3).map((n) => n.textContent).join('').trim();
    const field = el.matches('input:not([type=checkbox]):not([type=radio]):not([type=file]), select, textarea');
    if (own) check(el, own);
    else if (field) check(el, el.value || '(field)');
    // A float's full digits or an exponent, as JS writes a number it was not told how to.
    if (own && !field && /\d\.\d{6,}|\d[eE][+-]?\d+\b/.test(own) && !el.closest('a, .link')) raw.push(`${describe(el)}: “${own.slice(0, 80)}”`);
  }
  return { controls, contrast, raw };
}

// The focused element's look: its index, and whether its outline or shadow shows it
// (differs from its look without focus, 3:1 against what is behind it).
function focused() {
  const el = document.activeElement;
  if (!el || el === document.body || !el.dataset.ax) return { i: el && el !== document.body ? -2 : -1, what: el ? el.tagName : '' };
  const s = getComputedStyle(el);
  const look = `${s.outlineStyle} ${s.outlineWidth} ${s.outlineColor} | ${s.boxShadow}`;
  const outline = s.outlineStyle !== 'none' && parseFloat(s.outlineWidth) >= 1 ? s.outlineColor : null;
  const shadow = s.boxShadow !== 'none' ? (s.boxShadow.match(/rgba?\([^)]*\)/) || [null])[0] : null;
  return { i: Number(el.dataset.ax), look, mark: outline || shadow };
}

// WCAG contrast between two CSS colours over a background colour, in the page.
function markContrast([mark, at]) {
  const el = document.querySelector(`[data-ax="${at}"]`);
  const probe = document.createElement('canvas').getContext('2d');
  const rgba = (css) => { probe.clearRect(0, 0, 1, 1); probe.fillStyle = css; probe.fillRect(0, 0, 1, 1); return [...probe.getImageData(0, 0, 1, 1).data]; };
  // What is behind the control: its parent's first opaque background up the tree.
  let n = el.parentElement;
  let bg = [255, 255, 255, 255];
  for (; n; n = n.parentElement) { const b = rgba(getComputedStyle(n).backgroundColor); if (b[3] === 255) { bg = b; break; } }
  const m = rgba(mark);
  const mixed = m.slice(0, 3).map((c, k) => (c * m[3] + bg[k] * (255 - m[3])) / 255);
  const lum = ([r, g, b]) => { const lin = (c) => { const s = c / 255; return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4; }; return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b); };
  const [a, b] = [lum(mixed), lum(bg)].sort((p, q) => q - p);
  return (a + 0.05) / (b + 0.05);
}

// Chromium's accessible names of the marked controls, by data-ax index.
async function names(page) {
  const cdp = await page.context().newCDPSession(page);
  await cdp.send('Accessibility.enable');
  const { root } = await cdp.send('DOM.getDocument', { depth: -1 });
  const byIndex = new Map();
  const walk = (node) => {
    const attrs = node.attributes || [];
    const k = attrs.indexOf('data-ax');
    if (k >= 0 && k % 2 === 0) byIndex.set(Number(attrs[k + 1]), node.backendNodeId);
    for (const c of node.children || []) walk(c);
  };
  walk(root);
  const { nodes } = await cdp.send('Accessibility.getFullAXTree');
  const byBackend = new Map(nodes.filter((n) => n.backendDOMNodeId).map((n) => [n.backendDOMNodeId, n]));
  await cdp.detach();
  return (i) => {
    const n = byBackend.get(byIndex.get(i));
    return n && n.name ? String(n.name.value || '').trim() : '';
  };
}

// Audits what shows now under `root`; walks Tab through the page when `tab`.
// Returns a list of failures.
async function check(page, where, { root = 'body', tab = true } = {}) {
  const a = await page.evaluate(audit, root);
  const fails = [...a.contrast.map((c) => `contrast: ${c}`), ...a.raw.map((r) => `raw number: ${r}`)];
  const name = await names(page);
  for (const c of a.controls) if (c.named && !name(c.i)) fails.push(`no accessible name: ${c.what}`);
  if (!tab) return fails.map((f) => `${where}: ${f}`);
  const expected = new Set(a.controls.filter((c) => c.tabbable).map((c) => c.i));
  const reached = new Set();
  await page.evaluate(() => { document.activeElement.blur(); window.scrollTo(0, 0); });
  let first = null;
  for (let k = 0; k < 3 * a.controls.length + 20; k++) {
    await page.keyboard.press('Tab');
    const f = await page.evaluate(focused);
    if (f.i === -2) fails.push(`Tab reached an element the audit did not list: ${f.what}`);
    if (f.i < 0) continue;
    if (f.i === first) break;
    if (first === null) first = f.i;
    if (reached.has(f.i)) continue;
    reached.add(f.i);
    const c = a.controls[f.i];
    if (!f.mark || f.look === c.rest) fails.push(`no visible focus indicator: ${c.what} (${f.look})`);
    else {
      const r = await page.evaluate(markContrast, [f.mark, f.i]);
      if (r < 3) fails.push(`focus indicator ${f.mark} only ${r.toFixed(2)}:1 against its background: ${c.what}`);
    }
  }
  for (const i of expected) if (!reached.has(i)) fails.push(`not reached by Tab: ${a.controls[i].what}`);
  return fails.map((f) => `${where}: ${f}`);
}

const show = async (page, id) => {
  await page.evaluate((id) => { location.hash = id; }, id);
  // Bench computes only once readings are given.
  await page.waitForSelector(`#panel-${id}:not([hidden])${id === 'bench' ? '' : '[data-computed]'}`, { timeout: 60000 });
  // Background panels: until the run on show is done (no progress bar, no stale note).
  await page.waitForFunction((id) => {
    const p = document.getElementById(`panel-${id}`);
    return [...p.querySelectorAll('.run, .stale-note')].every((n) => n.hidden);
  }, id, { timeout: 60000 });
};

for (const scheme of ['light', 'dark']) {
  test(`Every panel in the ${scheme} theme: names, Tab order, focus indicators, contrast, numbers`, async () => {
    const page = await browser.context.newPage();
    const seen = watch(page);
    await page.emulateMedia({ colorScheme: scheme });
    await page.goto(`${PAGE_URL}#part`);
    await ready(page);
    const fails = [];
    for (const id of PANELS) {
      await show(page, id);
      if (id === 'stage') {
        // The designed pairs, each with Use, are controls too.
        await page.locator('#panel-stage').getByRole('button', { name: 'Design', exact: true }).click();
        await page.waitForSelector('#panel-stage[data-designed]');
      }
      fails.push(...await check(page, `${scheme}, ${id}`));
    }
    // A bad value: its message, the field marked, the figures kept and marked stale.
    await show(page, 'stage');
    await page.evaluate(() => HR.design.set('stage', 'r_fb_ohm', '-2k2'));
    await page.waitForFunction(() => !document.querySelector('#panel-stage .stale-note').hidden);
    // …and the status line saying why there is no link.
    await page.locator('#docbar').getByRole('button', { name: 'Copy link' }).click();
    await page.waitForSelector('#engine-status.problem');
    fails.push(...await check(page, `${scheme}, stage with a bad value`, { tab: false }));
    await page.evaluate(() => HR.design.undo());
    // The Embed dialog.
    await page.locator('#docbar').getByRole('button', { name: 'Embed…' }).click();
    await page.waitForSelector('dialog[open]');
    fails.push(...await check(page, `${scheme}, Embed dialog`, { root: 'dialog[open]', tab: false }));
    await page.keyboard.press('Escape');
    // A notice: a damaged link pasted into the address.
    await page.evaluate(() => { location.hash = 'part&d=AAAA'; });
    await page.waitForSelector('.notice');
    fails.push(...await check(page, `${scheme}, a notice`, { root: '.notices', tab: false }));
    // The hint shown while a file is dragged over the page.
    await page.evaluate(() => { document.querySelector('.drop-hint').hidden = false; });
    fails.push(...await check(page, `${scheme}, the drop hint`, { root: '.drop-hint', tab: false }));
    assert.deepEqual(fails, []);
    assert.deepEqual(seen.requests, []);
    assert.deepEqual(seen.errors, []);
    await page.close();
  });
}

test('Embed mode, compact and read only, in both themes: names and contrast', async () => {
  for (const scheme of ['light', 'dark']) {
    for (const flag of ['embed', 'embed=view']) {
      const page = await browser.context.newPage();
      const seen = watch(page);
      await page.emulateMedia({ colorScheme: scheme });
      await page.goto(`${PAGE_URL}#stage&${flag}`);
      await ready(page);
      await page.waitForSelector('#panel-stage[data-computed]');
      assert.deepEqual(await check(page, `${scheme}, stage&${flag}`, { tab: false }), []);
      assert.deepEqual(seen.requests, []);
      assert.deepEqual(seen.errors, []);
      await page.close();
    }
  }
});

test('The audit finds what it looks for: a control without a name, faint text, a focus that does not show, a raw number', async () => {
  const page = await browser.context.newPage();
  await page.goto(`${PAGE_URL}#bench`);
  await ready(page);
  await page.evaluate(() => {
    const box = document.createElement('div');
    box.id = 'probe';
    box.style.cssText = 'background:#fff;color:#000';
    box.innerHTML = '<button type="button" style="outline:none"></button><p style="color:#999">faint</p>'
      + '<p style="color:#767676;font-size:24px">large grey, 4.5:1</p><p>0.30000000000000004</p><input type="text" style="outline:none;box-shadow:none">';
    document.getElementById('main').prepend(box);
  });
  const fails = await check(page, 'probe', { root: '#probe' });
  const has = (re) => fails.some((f) => re.test(f));
  assert.ok(has(/no accessible name: button/), fails.join('\n'));
  assert.ok(has(/no accessible name: input/), fails.join('\n'));
  assert.ok(has(/contrast: p “faint”: 2\.85:1 < 4\.5:1/), fails.join('\n'));
  assert.ok(!has(/large grey/), 'large text needs 3:1 only');
  assert.ok(has(/raw number: p “0\.30000000000000004”/), fails.join('\n'));
  assert.ok(has(/no visible focus indicator: button/) && has(/no visible focus indicator: input/), fails.join('\n'));
  await page.close();
});
