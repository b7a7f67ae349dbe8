'use strict';
// Design documents in and out of the page: the header's Design bar (Save, Open, Copy
// link, Embed, Load the demo, Print sheet), opening a file dropped on the page, the link that holds
// the whole draft (`#panel&d=…`, deflate-raw and base64url), and the notice when the
// stored draft could not be read. Whatever is opened is migrated (when the core has a
// migration), then checked by the core; a refused one leaves the design as it was, a
// good one replaces it as one undoable step.

HR.documents = (() => {
  const { el } = HR.ui;
  const MAX_BYTES = 4 << 20; // the core's MAX_DOCUMENT_BYTES (src/doc/mod.rs)
  const MAX_LINK = 8000; // characters of address a link may take
  // The fragment's parts: the panel, and the flags `embed`, `embed=view`, `d=…`
  // (base64url has no `&`).
  const parts = location.hash.slice(1).split('&');
  const view = parts.includes('embed=view');
  const embed = view || parts.includes('embed');
  const linked = parts.find((p) => p.startsWith('d='));

  const status = (text, problem) => HR.setStatus(text, problem);
  // What the header says of the last open ("Opened …", "Loaded the demo …"), while it
  // is on show: it goes when an open is tried again, fails or is taken back by Undo, so
  // the header says "Opened" only of a design that was opened and is on the page.
  let openedSaid = null;
  let openedStep = null; // the undo step of that open
  const opened = (text, step) => { status(text); [openedSaid, openedStep] = [text, step]; };
  const unsay = () => {
    if (openedSaid !== null && document.getElementById('engine-status').textContent === openedSaid) status('');
    openedSaid = null;
  };
  let notices;
  let openNotice = null;
  // A notice under the header until dismissed (`onDismiss` runs then). Notices of
  // opening are one at a time (`replaces`): a new one takes the place of the last,
  // and an open that succeeds clears it.
  const notice = (text, buttons = [], onDismiss, replaces = false) => {
    const n = el('div', { class: 'notice', role: 'alert' }, el('p', {}, text), ...buttons,
      el('button', { type: 'button', class: 'small', onclick: () => { n.remove(); if (onDismiss) onDismiss(); } }, 'Dismiss'));
    if (replaces && openNotice && openNotice.isConnected) openNotice.replaceWith(n);
    else notices.append(n);
    if (replaces) openNotice = n;
    return n;
  };
  const openFailed = (text) => { unsay(); return notice(text, [], null, true); };
  const openDone = (text, step) => {
    if (openNotice) { openNotice.remove(); openNotice = null; }
    opened(text, step);
  };
  // A dialog of the page's own (a frame may block window.confirm): resolves to the
  // value of the button pressed, or false on Escape.
  let dialogs = 0;
  const dialog = (title, body, actions) => new Promise((resolve) => {
    const id = `dialog-${++dialogs}`;
    const d = el('dialog', { class: 'dialog', 'aria-labelledby': id }, el('h2', { id }, title), ...body,
      el('div', { class: 'actions' }, actions.map(([text, value, focus]) => el('button', {
        type: 'button', autofocus: focus, onclick: () => { resolve(value); d.close(); } }, text))));
    d.addEventListener('close', () => { resolve(false); d.remove(); });
    document.body.append(d);
    d.showModal();
  });
  const copyField = (label, text) => {
    const area = el('textarea', { readonly: true, rows: 4, spellcheck: 'false', onfocus: () => area.select() }, text);
    return el('label', { class: 'copy' }, label, area);
  };

  const plain = (v) => v !== null && typeof v === 'object' && !Array.isArray(v);
  const same = (a, b) => JSON.stringify(JSON.parse(a)) === JSON.stringify(JSON.parse(b));
  const refuse = (source, e) => openFailed(`${source} was not opened — ${HR.words(e)}. Your design is unchanged.`);

  // Reading (done), migrating, checking and loading a document's text: the one path
  // for a file, a dropped file and a link. A refused document changes nothing.
  const take = (text, source, label, said = `Opened ${source} — Undo brings back your previous design.`) => {
    const m = HR.call('migrateDocument', text);
    const r = m.error ? m : HR.call('checkDocument', m.ok);
    // checkDocument also reads `[1]` as a version-1 document; only an object is one here.
    const opened = !m.error && JSON.parse(m.ok);
    const e = r.error || (!plain(opened) && { field: 'document', reason: 'is not a JSON object' });
    if (e) return refuse(source, e);
    const from = m.ok === text ? '' : ` (brought up from format ${JSON.parse(text).halfrail} to ${opened.halfrail}; saving writes the new format)`;
    if (HR.design.load(m.ok, label)) openDone(said + from, label);
  };

  const open = async (file) => {
    if (HR.design.readOnly()) return;
    // Refused before reading, as the core would after (it counts UTF-8 bytes too).
    if (file.size > MAX_BYTES) return refuse(file.name, { field: 'document', reason: `is ${file.size} bytes; at most ${MAX_BYTES} are accepted` });
    let text;
    try { text = await file.text(); } catch (e) { return refuse(file.name, { field: 'document', reason: 'could not be read' }); }
    take(text, file.name, `open “${file.name}”`);
  };

  // The start of a saved file's name from the document's title: letters, digits, `.`,
  // `_` and `-` kept, every other run one `-`, at most 80 characters; '' with no title.
  const stem = () => {
    const t = String(HR.design.section('title') || '').normalize('NFKC');
    return t.replace(/[^\p{L}\p{N}._-]+/gu, '-').slice(0, 80).replace(/^[-.]+|[-.]+$/g, '');
  };
  // The design file's name from the title, else `design`.
  const fileName = () => `${stem() || 'design'}.halfrail.json`;
  // The name of what else the page saves (`sweep`, `csv`): `<title>-sweep.csv`, or
  // `halfrail-sweep.csv` for a design without a title.
  const named = (what, ext) => `${stem() || 'halfrail'}-${what}.${ext}`;
  const save = () => {
    const text = HR.design.text();
    const name = fileName();
    HR.ui.download(name, new Blob([`${JSON.stringify(JSON.parse(text), null, 2)}\n`], { type: 'application/json' }));
    const r = HR.call('checkDocument', text);
    status(r.error ? `Saved ${name}; it still has a bad value (${HR.words(r.error)}), and opening it will be refused until that is fixed.`
      : `Saved ${name}.`, !!r.error);
  };

  const bytes = (stream) => new Response(stream).arrayBuffer().then((b) => new Uint8Array(b));
  const deflate = async (text) => {
    let s = '';
    for (const b of await bytes(new Blob([text]).stream().pipeThrough(new CompressionStream('deflate-raw')))) s += String.fromCharCode(b);
    return btoa(s).replace(/\+/g, '-').replace(/\//g, '_').replace(/=+$/, '');
  };
  const inflate = async (code) => {
    const raw = Uint8Array.from(atob(code.replace(/-/g, '+').replace(/_/g, '/')), (c) => c.charCodeAt(0));
    return new TextDecoder('utf-8', { fatal: true }).decode(await bytes(new Blob([raw]).stream().pipeThrough(new DecompressionStream('deflate-raw'))));
  };
  const panel = () => (document.querySelector('#rail a[aria-current]') || { dataset: {} }).dataset.panel || 'part';
  // The address of this page on the current panel with `extra` flags and the draft,
  // or null (why is `say`'d, by default in the status line) when the draft has a bad
  // value or the address would be too long.
  const address = async (extra = '', say = status) => {
    const text = HR.design.text();
    const r = HR.call('checkDocument', text);
    if (r.error) { say(`A link would not open while ${HR.fieldWords(r.error.field) || r.error.field} is bad (${HR.reasonWords(r.error)}); fix it first.`, true); return null; }
    const url = `${location.href.split('#')[0]}#${panel()}${extra}&d=${await deflate(text)}`;
    if (url.length <= MAX_LINK) return url;
    say(`This design is too long for a link (${url.length} characters; at most ${MAX_LINK}): save it as a file instead.`, true);
    return null;
  };
  const copyLink = async () => {
    const url = await address();
    if (!url) return;
    try {
      await navigator.clipboard.writeText(url);
      status('Link copied: it holds the whole design.');
    } catch (e) {
      // No clipboard here (a frame, or a page from disk): the link to copy by hand.
      dialog('Link to this design', [el('p', {}, 'The clipboard is not available here; copy the link from the field.'), copyField('Link', url)], [['Close', true, true]]);
    }
  };
  const embedDialog = async () => {
    const url = await address('&embed');
    const viewUrl = url && await address('&embed=view');
    if (!viewUrl) return;
    const markup = (src) => `<iframe id="halfrail" src="${src}" title="Halfrail amplifier design" width="100%" height="700" style="border:0"></iframe>\n`
      + '<script>addEventListener(\'message\', (e) => { const f = document.getElementById(\'halfrail\'); if (e.source === f.contentWindow && e.data && e.data.type === \'halfrail-height\') f.style.height = e.data.height + \'px\'; });</script>';
    dialog('Embed this design', [
      el('p', {}, 'Paste one into the host page, with the address changed to where the page will be. The script lets the frame take the page’s height.'),
      copyField('Editable', markup(url)), copyField('Read only', markup(viewUrl))], [['Close', true, true]]);
  };
  const demo = async () => {
    const text = HR.demoText();
    if (same(HR.design.text(), text)) return status('This is the demo design already.');
    const yes = await dialog('Load the demo design?', [el('p', {}, 'The demo replaces the design on the page. Undo brings yours back.')],
      [['Load the demo', true], ['Keep my design', false, true]]);
    if (yes && HR.design.load(text, 'load the demo')) opened('Loaded the demo design — Undo brings back your previous design.', 'load the demo');
  };

  // The page's one Undo/Redo pair, for every panel's edits (HR.design keeps one
  // history for the whole design), each saying what it takes back; and Ctrl+Z,
  // Ctrl+Y (or Ctrl+Shift+Z) anywhere but in a text field, which keeps its own.
  const undoRedo = () => {
    const undo = el('button', { type: 'button', onclick: () => HR.design.undo() }, 'Undo');
    const redo = el('button', { type: 'button', onclick: () => HR.design.redo() }, 'Redo');
    const sync = () => {
      undo.disabled = !HR.design.canUndo();
      redo.disabled = !HR.design.canRedo();
      undo.title = undo.disabled ? 'Nothing to undo' : `Undo: ${HR.design.undoLabel()} (Ctrl+Z)`;
      redo.title = redo.disabled ? 'Nothing to redo' : `Redo: ${HR.design.redoLabel()} (Ctrl+Y)`;
    };
    HR.design.onChange(sync);
    sync();
    document.addEventListener('keydown', (e) => {
      if (!(e.ctrlKey || e.metaKey) || e.altKey) return;
      const focus = document.activeElement;
      if (focus && (['INPUT', 'TEXTAREA', 'SELECT'].includes(focus.tagName) || focus.isContentEditable)) return;
      const key = e.key.toLowerCase();
      if (key === 'z' && !e.shiftKey) { HR.design.undo(); e.preventDefault(); }
      if ((key === 'z' && e.shiftKey) || key === 'y') { HR.design.redo(); e.preventDefault(); }
    });
    return [undo, redo];
  };

  const bar = () => {
    const picker = el('input', { type: 'file', accept: '.json,application/json', hidden: true, 'aria-label': 'Design file to open',
      onchange: () => { if (picker.files[0]) open(picker.files[0]); picker.value = ''; } });
    // A new open starts: what the header said of the last one goes (a cancelled
    // choice opens nothing, and the header then says nothing was).
    picker.addEventListener('click', unsay);
    const button = (text, onclick) => el('button', { type: 'button', onclick }, text);
    document.getElementById('docbar').replaceChildren(el('span', {}, 'Design'), ...(view ? [] : undoRedo()),
      button('Save', save), view ? null : button('Open…', () => picker.click()), button('Copy link', copyLink),
      view ? null : button('Embed…', embedDialog), view ? null : button('Load the demo', demo), button('Print sheet', () => HR.sheet.print()),
      view ? null : picker, ...HR.compare.controls(embed));
  };

  // Files dragged over the page: the hint shows; one dropped is opened. The page's
  // default (the browser opening the file in its place) is always stopped.
  const dropping = () => {
    const hint = el('div', { class: 'drop-hint', hidden: true }, 'Drop a design file (.halfrail.json) to open it');
    document.body.append(hint);
    let depth = 0;
    const files = (e) => e.dataTransfer && [...e.dataTransfer.types].includes('Files');
    const shown = (on) => { hint.hidden = !on || view; if (!on) depth = 0; };
    document.addEventListener('dragenter', (e) => { if (files(e)) { depth += 1; shown(true); } });
    document.addEventListener('dragleave', (e) => { if (files(e) && --depth <= 0) shown(false); });
    document.addEventListener('dragover', (e) => { if (files(e)) e.preventDefault(); });
    document.addEventListener('drop', (e) => {
      if (!files(e)) return;
      e.preventDefault();
      shown(false);
      if (e.dataTransfer.files[0]) open(e.dataTransfer.files[0]);
    });
  };

  // Opens the design of a link (the fragment's parts) through the same path as a file.
  // Outside a frame it comes once: it leaves the address, so a reload keeps your edits.
  const fromLink = async (parts) => {
    const rest = parts.filter((p) => !p.startsWith('d='));
    if (!embed) history.replaceState(null, '', `${location.pathname}${location.search}${rest.length ? `#${rest.join('&')}` : ''}`);
    const text = await inflate(parts.find((p) => p.startsWith('d=')).slice(2)).catch(() => null);
    if (text === null) return openFailed('The design in this link is damaged or cut short, so it was not opened. Your own design is kept.');
    take(text, 'The design in the link', 'open the link', view ? 'Showing the design in the link, read only.'
      : embed ? 'Showing the design in the link; changes stay in this frame.' : 'Opened the design in the link — Undo brings back your previous design.');
  };

  // What is left of the fragment for the rail's links: embed mode stays on, and an
  // embedded link's design stays in the address (the frame keeps no design of its own).
  const tail = embed ? `&embed${view ? '=view' : ''}${linked ? `&${linked}` : ''}` : '';

  // The header's title: the design's, or that it has none (the Brief panel names it).
  // Text, not a link: the Design bar stays the first thing Tab reaches.
  const headerTitle = () => {
    const node = document.getElementById('design-title');
    const sync = () => {
      const t = String(HR.design.section('title') || '').trim();
      node.textContent = t || 'Untitled design';
      node.classList.toggle('untitled', !t);
    };
    HR.design.onChange(sync);
    sync();
  };

  return {
    tail,
    named,
    stem,
    // The link to the draft: address(extra, say) above (the design sheet prints it).
    link: address,
    // The stored (or linked) design, the Design bar, and embed mode; before the first panel.
    async start() {
      notices = el('div', { class: 'notices' });
      document.querySelector('.top').after(notices);
      // An embedded link's design or view is the frame's alone: it is not stored over yours.
      HR.design.start({ persist: !(embed && linked) && !view });
      if (embed) HR.embed.start(view);
      bar();
      headerTitle();
      // Undo of the open itself: the design opened is no longer on the page.
      HR.design.onChange((origin) => { if (origin === 'undo' && openedSaid !== null && HR.design.redoLabel() === openedStep) unsay(); });
      dropping();
      const lost = HR.design.recovered();
      if (lost.length) {
        notice(`The design stored in this browser could not be read (${lost.map((r) => r.why).join('; ')}), so the page started on the demo. Its text is kept until you dismiss this.`,
          lost.map((r, i) => el('button', { type: 'button', onclick: () => HR.ui.download(`halfrail-stored-design${i ? `-${i + 1}` : ''}.txt`, new Blob([r.text], { type: 'text/plain' })) },
            `Download the stored text${lost.length > 1 ? ` (${i + 1})` : ''}`)),
          () => HR.design.dismissRecovered());
      }
      if (linked) await fromLink(parts);
      // A link pasted into the address of the open page (no reload: only the fragment changes).
      if (!embed) window.addEventListener('hashchange', () => { const p = location.hash.slice(1).split('&'); if (p.some((x) => x.startsWith('d='))) fromLink(p); });
      if (view) HR.design.lock();
    },
  };
})();
