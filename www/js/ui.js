'use strict';
// Small DOM helpers. Text always goes in as text (textContent), never as markup,
// so nothing a user types can become part of the page.

HR.ui = (() => {
  let nextId = 0;
  const uid = (stem) => `${stem}-${++nextId}`;

  // el('div', {class: 'x', 'aria-label': 'y'}, child, 'text', …)
  const el = (tag, attrs = {}, ...children) => {
    const node = document.createElement(tag);
    for (const [key, value] of Object.entries(attrs)) {
      if (value === false || value === null || value === undefined) continue;
      if (key.startsWith('on')) node.addEventListener(key.slice(2), value);
      else node.setAttribute(key, value === true ? '' : String(value));
    }
    for (const child of children.flat()) {
      if (child === null || child === undefined || child === false) continue;
      node.append(child instanceof Node ? child : document.createTextNode(String(child)));
    }
    return node;
  };

  // A card: a titled section of a panel.
  const card = (title, ...children) => {
    const id = uid('card');
    return el('section', { class: 'card', 'aria-labelledby': id }, el('h2', { id }, title), ...children);
  };

  // A labelled text input (a box of `rows` lines if given) with a place for its error
  // beside it. `onInput(text)` runs on every edit; `setError(reason)` shows a reason,
  // or clears it with null.
  const field = ({ label, value, hint, onInput, id = uid('field'), rows = 0 }) => {
    const describedby = hint ? `${id}-err ${id}-hint` : `${id}-err`;
    const input = rows
      ? el('textarea', { id, rows, spellcheck: 'false', 'aria-describedby': describedby })
      : el('input', { id, type: 'text', value, spellcheck: 'false', autocomplete: 'off', 'aria-describedby': describedby });
    if (rows) input.value = value;
    const error = el('span', { class: 'error', id: `${id}-err`, 'aria-live': 'polite' });
    input.addEventListener('input', () => onInput(input.value));
    const setError = (reason) => {
      input.setAttribute('aria-invalid', reason ? 'true' : 'false');
      error.textContent = reason || '';
    };
    const wrap = el('div', { class: 'field' },
      el('label', { for: id }, label), input,
      hint ? el('span', { class: 'hint', id: `${id}-hint` }, hint) : null, error);
    return { wrap, input, setError };
  };

  // A labelled <select> of [value, text] options.
  const choice = ({ label, options, value, onChange }) => {
    const id = uid('choice');
    const select = el('select', { id, onchange: () => onChange(select.value) },
      options.map(([v, text]) => el('option', { value: v, selected: v === value }, text)));
    return { wrap: el('div', { class: 'field' }, el('label', { for: id }, label), select), select };
  };

  // Replaces a table body with rows of cells (strings or nodes).
  const fillRows = (tbody, rows) => {
    tbody.replaceChildren(...rows.map((cells) => el('tr', {}, cells.map((c, i) =>
      i === 0 ? el('th', { scope: 'row' }, c) : el('td', {}, c)))));
  };

  const table = (caption, headings) => {
    const tbody = el('tbody');
    const node = el('table', {},
      el('caption', {}, caption),
      el('thead', {}, el('tr', {}, headings.map((h) => el('th', { scope: 'col' }, h)))),
      tbody);
    return { node, tbody };
  };

  // Offers `data` (a Blob) as a file download named `name`.
  const download = (name, data) => {
    const url = URL.createObjectURL(data);
    const a = el('a', { href: url, download: name, hidden: true });
    document.body.append(a);
    a.click();
    a.remove();
    setTimeout(() => URL.revokeObjectURL(url), 1000);
  };

  // A scheduler that runs `fn` once after the current burst of changes (the end of
  // the event that made them), not once per change and without waiting for a frame.
  const coalesce = (fn) => {
    let queued = false;
    return () => {
      if (queued) return;
      queued = true;
      queueMicrotask(() => { queued = false; fn(); });
    };
  };

  // Whether a panel is on show, and `fn` run each time the shell shows it again
  // (its `hr-shown` event): what a panel that computes only while shown listens to.
  const shown = (panel) => !panel.hidden && !panel.closest('[hidden]');
  const onShown = (panel, fn) => panel.addEventListener('hr-shown', fn);

  // Marks each `.scroll` box within `root` that is wider inside than it shows with
  // `data-more` ("left", "right" or both: where more is hidden), which panels.css draws
  // as a shadow at that edge — so a wide table says it scrolls. Kept in step as the box
  // or its content is resized (the window, rows filled in) and as it scrolls.
  const cued = new WeakSet();
  const scrollCues = (root) => {
    for (const box of root.querySelectorAll('.scroll')) {
      if (cued.has(box)) continue;
      cued.add(box);
      const mark = () => {
        const hidden = box.scrollWidth - box.clientWidth;
        const more = [box.scrollLeft > 1 ? 'left' : '', hidden - box.scrollLeft > 1 ? 'right' : ''].filter(Boolean).join(' ');
        if (more) box.dataset.more = more; else delete box.dataset.more;
      };
      box.addEventListener('scroll', mark, { passive: true });
      const watch = new ResizeObserver(mark);
      watch.observe(box);
      for (const child of box.children) watch.observe(child);
    }
  };

  return { el, uid, card, field, choice, fillRows, table, download, coalesce, shown, onShown, scrollCues };
})();
