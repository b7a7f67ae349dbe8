'use strict';
// Fields bound to the design, so that no panel writes its own plumbing for one:
//
//   HR.bind(section, key, opts) → {wrap, input, path, show(reason | null)}
//
// makes the labelled input for one value of the document (`path`: `section.key`; the
// key may be a list path, `blocks[2].loss_db`), shows the design's value in it and
// keeps it in step with every change (never under the user's typing: not while the
// input has the focus), commits what is typed as a step of undo, and shows beside it
// the error the core names its path with. HR.bind.route(scope, error) is that one
// routing, from error.field to the bound input within `scope` (a panel); the follow
// engines (HR.design.follow, HR.background.follow) call it for their panels.
//
// opts: label, hint     a labelled field (HR.ui.field); `rows` makes it a box of
//                       lines, `id` names it
//       aria, attrs     a bare input for a table cell, named by its aria-label, with
//                       its error after it
//       options         a <select> of [value, text]; `fallback` is shown for no value
//       tick            a checkbox labelled so: true when ticked, removed when not
//       choices         a group of checkboxes, [value, text] each, under `label`: the
//                       list of the values ticked, in the choices' order; an error
//                       shows under the group and flags the one box whose value it
//                       names as a word (the box to untick)
//       compact         the field takes the grid's compact width
//       origin          who changed the design (HR.design.set's origin)
//       read(text)      the value to store for what is typed (default: it, trimmed)
//       write(value)    the text to show for a value (default: as is, '' for none)
//       value()         the value to show (default: the design's at the path)
//       commit(value)   stores it (default: HR.design.set, where a run of edits of one
//                       field is one step)
//       on: 'change'    commits on Enter or on leaving the field, and Escape puts the
//                       design's value back (default: on every edit)
// Selects and ticks have no place for an error: one naming them stays with the panel.
//
//   HR.bind.widget(path, {value, commit, ...opts}) → the same
//
// is that field over a store of the panel's own (Bench's conversions, kept in
// HR.store and no part of the design or its undo): `value()` and `commit(value)` are
// required, and `path` is the name the core's errors give it, for HR.bind.route.

HR.bind = (() => {
  const { el, field, choice } = HR.ui;
  const bindings = new WeakMap(); // input → its binding: the page itself lists them

  const text = (v) => (v === undefined || v === null ? '' : String(v));
  const none = (v) => v === undefined || v === null || v === '';
  const same = (a, b) => (none(a) && none(b)) || JSON.stringify(a) === JSON.stringify(b);
  const trim = (t) => t.trim();

  // The design's value at a key within a section: `gain_db` or `blocks[2].loss_db`.
  const at = (section, key) => {
    let v = HR.design.section(section);
    for (const step of key.match(/[^.[\]]+/g) || []) {
      if (v === null || typeof v !== 'object') return undefined;
      v = Object.prototype.hasOwnProperty.call(v, step) ? v[step] : undefined;
    }
    return v;
  };

  const widget = (path, opts) => {
    const { label, hint, rows, id, aria, attrs = {}, options, fallback = '', tick, choices, compact, value, commit, on = 'input' } = opts;
    const read = opts.read || (options ? (t) => t : trim);
    const write = opts.write || text;
    // Whether a text already stands for the stored value (as typed, or as written).
    const showing = (t) => same(read(t), read(write(value())));

    let wrap;
    let input;
    let show = () => {};
    let boxes = [];
    if (choices) {
      const group = HR.ui.uid('choices');
      const error = el('span', { class: 'error', id: `${group}-err`, 'aria-live': 'polite' });
      show = (reason) => {
        error.textContent = reason || '';
        const word = (v) => new RegExp(`(^|[^\\w])${v.replace(/[^\w]/g, '\\$&')}($|[^\\w])`);
        const named = reason ? boxes.filter((b) => word(b.value).test(reason)) : [];
        for (const b of boxes) {
          const flagged = named.length === 1 && named[0] === b;
          b.setAttribute('aria-invalid', flagged ? 'true' : 'false');
          b.parentElement.classList.toggle('flagged', flagged);
        }
      };
      const ticked = () => boxes.filter((b) => b.checked).map((b) => b.value);
      boxes = choices.map(([v]) => el('input', { type: 'checkbox', value: v, 'aria-describedby': `${group}-err`,
        onchange: () => { show(null); commit(ticked()); } }));
      const chosen = value() || [];
      boxes.forEach((b) => { b.checked = chosen.includes(b.value); });
      wrap = el('fieldset', { class: 'field choices' }, el('legend', {}, label),
        el('div', { class: 'ticks' }, boxes.map((b, i) => el('label', { class: 'tick' }, b, ` ${choices[i][1]}`))),
        hint ? el('span', { class: 'hint' }, hint) : null, error);
      input = boxes[0];
    } else if (options) {
      const c = choice({ label, options, value: write(value()) || fallback, onChange: (v) => commit(read(v)) });
      [wrap, input] = [c.wrap, c.select];
    } else if (tick) {
      input = el('input', { type: 'checkbox', onchange: () => commit(input.checked || '') });
      input.checked = value() === true;
      wrap = el('label', { class: 'tick' }, input, ` ${tick}`);
    } else if (aria) {
      input = el('input', { type: 'text', spellcheck: 'false', autocomplete: 'off', ...attrs, 'aria-label': aria, value: write(value()) });
      const error = el('span', { class: 'error', 'aria-live': 'polite' });
      show = (reason) => {
        input.setAttribute('aria-invalid', reason ? 'true' : 'false');
        error.textContent = reason || '';
      };
      wrap = el('span', { class: 'in-cell' }, input, error);
    } else {
      const f = field({ label, hint, rows, id, value: write(value()), onInput: (t) => { if (on === 'input') commit(read(t)); } });
      [wrap, input, show] = [f.wrap, f.input, f.setError];
    }
    if (compact) wrap.classList.add('compact');
    if (on === 'change') {
      const apply = () => { if (!showing(input.value)) commit(read(input.value)); };
      input.addEventListener('change', apply);
      input.addEventListener('keydown', (e) => {
        if (e.key === 'Enter') apply();
        if (e.key === 'Escape') input.value = write(value());
      });
    }

    const sync = () => {
      if (choices) {
        const chosen = value() || [];
        boxes.forEach((b) => { b.checked = chosen.includes(b.value); });
      } else if (tick) input.checked = value() === true;
      else if (options) input.value = write(value()) || fallback;
      else if (document.activeElement !== input && !showing(input.value)) input.value = write(value());
    };
    const binding = { path, wrap, input, show: (reason) => show(reason), errors: !options && !tick, sync };
    for (const i of choices ? boxes : [input]) bindings.set(i, binding);
    return binding;
  };

  const bind = (section, key, opts = {}) => {
    const { origin = section } = opts;
    return widget(`${section}.${key}`, { ...opts,
      value: opts.value || (() => at(section, key)),
      commit: opts.commit || ((v) => HR.design.set(section, key, v, origin)) });
  };

  // The bound fields within `scope`: those on the page, so a field removed is gone
  // (a group of boxes is one field).
  const within = (scope) => [...new Set([...scope.querySelectorAll('input, textarea, select')].map((n) => bindings.get(n)).filter(Boolean))];

  // Shows `error` (or none: null) at the field within `scope` it names, and clears the
  // others: the field of its exact path, else the nearest one holding it (a reading of
  // the box `bench.gains` for `bench.gains[2].f_hz`). Returns that field's binding, or
  // null when no field there takes it (the panel says it elsewhere).
  const route = (scope, error) => {
    const fields = within(scope).filter((b) => b.errors);
    fields.forEach((b) => b.show(null));
    const path = error && error.field ? String(error.field) : '';
    if (!path) return null;
    const holds = (b) => path.startsWith(`${b.path}[`) || path.startsWith(`${b.path}.`);
    const target = fields.find((b) => b.path === path)
      || fields.filter(holds).reduce((best, b) => (!best || b.path.length > best.path.length ? b : best), null);
    if (target) target.show(HR.reasonWords(error));
    return target || null;
  };

  HR.design.onChange(() => within(document).forEach((b) => b.sync()));

  bind.route = route;
  bind.widget = widget;
  return bind;
})();
