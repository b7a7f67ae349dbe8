'use strict';
// Stage: the amplifier around the part as a schematic drawn from its topology, each
// value edited in place (click it, or Tab to it and press Enter), undo and redo, and
// the key figures beside it, recomputed by the core after every edit.

(() => {
  const { el, card } = HR.ui;

  const NAMES = {
    source_ohm: ['Rs', 'Ω'], shunt_ohm: ['R shunt', 'Ω'], c_in_f: ['C in', 'F'], r_in_ohm: ['R in', 'Ω'],
    r_fb_ohm: ['R fb', 'Ω'], c_fb_f: ['C fb', 'F'], r_out_ohm: ['R out', 'Ω'], c_out_f: ['C out', 'F'],
    load_ohm: ['R load', 'Ω'], load_f: ['C load', 'F'],
  };
  const FIGURES = [
    ['gain', 'Gain at f_design'], ['gt', 'Power gain GT'], ['band', 'Band edges (−3 dB)'], ['zin', 'Input impedance'],
    ['rl', 'Return loss'], ['nf', 'Noise figure'], ['iq', 'Bias current'], ['diss', 'Package dissipation'],
  ];

  const raw = (key) => {
    const v = HR.design.get('stage', key);
    return v === undefined || v === null ? '' : String(v);
  };

  // The label of a fitted component: its value in RKM code (resistors) or engineering
  // notation, and the coarsest E-series it belongs to; `short` for a 0 Ω series part.
  // `null` when not fitted.
  const label = (key) => {
    const text = raw(key);
    if (!text) return null;
    const [name, unit] = NAMES[key];
    const parsed = HR.call('parseValue', text, unit, `stage.${key}`);
    if (parsed.error) return { text: `${name} | ${text} (!)`, short: false };
    const v = parsed.ok.value;
    const shown = unit === 'Ω' ? (v === 0 ? '0 (short)' : wasm_bindgen.formatRkm(v, 'R') || HR.fmt(v, 'Ω', 3)) : HR.fmt(v, 'F', 3);
    const look = v > 0 ? HR.call('lookUp', String(v)) : { error: true };
    const series = look.ok && look.ok.member_of.length ? ` · ${look.ok.member_of[0]}` : '';
    return { text: `${name} | ${shown}${series}`, short: v === 0 };
  };

  HR.panel({
    id: 'stage',
    title: 'Stage',
    mount(container) {
      const canvas = el('canvas', { role: 'img', 'aria-label': 'Schematic of the stage' });
      const overlay = el('div', { class: 'schematic-labels' });
      const drawing = el('div', { class: 'schematic' }, canvas, overlay);
      const problem = el('p', { class: 'error', 'aria-live': 'polite' });
      const undo = el('button', { type: 'button', onclick: () => HR.design.undo() }, 'Undo');
      const redo = el('button', { type: 'button', onclick: () => HR.design.redo() }, 'Redo');
      let editing = null;

      const edit = (key, anchor) => {
        const input = el('input', { type: 'text', class: 'in-place', value: raw(key), spellcheck: 'false',
          'aria-label': `${NAMES[key][0]} (${key}), empty for not fitted`, style: `left:${anchor.x}px;top:${anchor.y}px` });
        editing = key;
        const finish = (commit) => {
          if (editing !== key) return;
          editing = null;
          if (commit && input.value.trim() !== raw(key)) HR.design.set('stage', key, input.value.trim(), 'stage');
          else refresh();
          const again = overlay.querySelector(`[data-key="${key}"]`);
          if (again) again.focus();
        };
        input.addEventListener('keydown', (e) => {
          if (e.key === 'Enter') finish(true);
          if (e.key === 'Escape') finish(false);
        });
        input.addEventListener('blur', () => finish(true));
        overlay.append(input);
        input.focus();
        input.select();
      };

      const refresh = (error) => {
        const anchors = HR.schematic.draw(canvas, label, Number(HR.design.get('part', 'stages')) || 1);
        overlay.replaceChildren(...anchors.map((a) => el('button', {
          type: 'button', class: a.text ? 'value' : 'value ghost', 'data-key': a.key,
          'aria-invalid': error && error.field === `stage.${a.key}` ? 'true' : 'false',
          style: `left:${a.x}px;top:${a.y}px`,
          'aria-label': a.text ? `${a.text.replace(' | ', ' ')}: edit` : `${NAMES[a.key][0]} not fitted: add`,
          onclick: () => edit(a.key, a),
        }, ...(a.text ? a.text.split(' | ').map((t) => el('span', {}, t)) : [`+ ${NAMES[a.key][0]}`]))));
        undo.disabled = !HR.design.canUndo();
        redo.disabled = !HR.design.canRedo();
      };

      const cells = {};
      const readout = el('dl', { class: 'readout' }, FIGURES.map(([k, text]) => {
        cells[k] = el('dd', { 'data-key': k }, '—');
        return el('div', {}, el('dt', {}, text), cells[k]);
      }));
      const stale = el('p', { class: 'stale-note', hidden: true }, 'Showing the last valid result.');
      const render = (r, b) => {
        const d = r.design;
        const fmt = HR.fmt;
        cells.gain.textContent = `${fmt(d.gain_db, 'dB')}${d.ideal_gain_db === null ? '' : ` (ideal ${fmt(d.ideal_gain_db, 'dB')})`}`;
        cells.gt.textContent = d.power_gain_db === null ? 'needs source and load resistance' : fmt(d.power_gain_db, 'dB');
        cells.band.textContent = `${d.f_low_hz === null ? 'below the sweep' : fmt(d.f_low_hz, 'Hz')} … ${d.f_high_hz === null ? 'above the sweep' : fmt(d.f_high_hz, 'Hz')}`;
        cells.zin.textContent = d.zin_re_ohm === null ? '—' : `${fmt(d.zin_re_ohm, 'Ω', 4)} ${d.zin_im_ohm < 0 ? '−' : '+'} j${fmt(Math.abs(d.zin_im_ohm), 'Ω', 3)}`;
        cells.rl.textContent = r.return_loss_db === null ? '—' : fmt(r.return_loss_db, 'dB');
        cells.nf.textContent = d.nf_db === null ? 'needs a source resistance' : fmt(d.nf_db, 'dB');
        cells.iq.textContent = fmt(b.iq_a, 'A');
        cells.diss.textContent = fmt(b.dissipation_w, 'W');
      };

      container.append(el('h1', {}, 'Stage'),
        el('p', { class: 'lede' }, 'The components around the part. Click a value (or Tab to it and press Enter) to change it; leave it empty to take the part out. Values take engineering notation or RKM codes (4k7, 100n).'),
        el('div', { class: 'cards' },
          (() => { const c = card('Schematic', el('div', { class: 'scroll' }, drawing), problem, el('div', { class: 'actions' }, undo, redo)); c.classList.add('wide'); return c; })(),
          (() => { const c = card('Key figures', stale, readout); c.classList.add('wide'); return c; })()));

      document.addEventListener('keydown', (e) => {
        if (container.hidden || container.closest('[hidden]') || !(e.ctrlKey || e.metaKey)) return;
        if (document.activeElement && ['INPUT', 'TEXTAREA'].includes(document.activeElement.tagName)) return;
        const key = e.key.toLowerCase();
        if (key === 'z' && !e.shiftKey) { HR.design.undo(); e.preventDefault(); }
        if ((key === 'z' && e.shiftKey) || key === 'y') { HR.design.redo(); e.preventDefault(); }
      });
      HR.design.follow(container, {
        // The figures need the sweep and the operating point; either error is the answer.
        compute: (text) => {
          const r = HR.call('responseReport', text);
          const b = r.ok ? HR.call('biasOf', text) : r;
          return r.error || b.error ? { error: r.error || b.error } : { ok: { r: r.ok, b: b.ok } };
        },
        render: ({ r, b }) => render(r, b),
        report: (error) => { refresh(error); problem.textContent = error ? error.message || error.reason : ''; },
        stale: (isStale, rendered) => {
          readout.classList.toggle('stale', isStale);
          stale.hidden = !(isStale && rendered);
        },
        when: () => !editing,
      });
    },
  });
})();
