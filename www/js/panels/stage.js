'use strict';
// Stage: the amplifier around the part as a schematic drawn from its topology, each
// value edited in place (click it, or Tab to it and press Enter; the Design bar undoes), and
// the key figures beside it, recomputed by the core after every edit.

(() => {
  const { el, card } = HR.ui;

  // A component's short name on the schematic and its unit (the core's catalogue).
  const nameOf = (key) => HR.field('stage', key).label;
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
    const { label: name, unit } = HR.field('stage', key);
    const parsed = HR.call('parseValue', text, unit, `stage.${key}`);
    if (parsed.error) return { text: `${name} | ${text} (!)`, short: false };
    const v = parsed.ok.value;
    const shown = unit === 'Ω' ? (v === 0 ? '0 (short)' : HR.rkm(v, 'R') || HR.fmt(v, 'Ω', 3)) : HR.fmt(v, 'F', 3);
    const coarsest = v > 0 ? HR.seriesOf(v) : '';
    const series = coarsest ? ` · ${coarsest}` : '';
    return { text: `${name} | ${shown}${series}`, short: v === 0 };
  };

  // ---- Design to a target --------------------------------------------------------
  const { known } = HR;
  const db = (v) => (known(v) ? HR.fmt(v, 'dB') : '—');
  // Signed, so over and short read apart; no sign where it rounds to nothing.
  const off = (v) => (db(v) !== '0.00 dB' && v > 0 ? `+${db(v)}` : db(v));
  const rkm = (v) => HR.rkm(v, 'R') || HR.fmt(v, 'Ω', 3);
  const rfb = (c) => (c.r_fb_parts_ohm ? c.r_fb_parts_ohm.map(rkm).join(c.r_fb_joined === 'series' ? ' + ' : ' ∥ ') : rkm(c.r_fb_ohm));
  // The text to put in the design: the RKM code when it reads back as exactly the value.
  const asText = (v, kind, unit) => {
    const code = HR.rkm(v, kind);
    const back = code ? HR.call('parseValue', code, unit, '') : {};
    return back.ok && back.ok.value === v ? code : v;
  };
  // The target's fields in the form, in the order shown (words from HR.field).
  const TARGET = ['gain_db', 'f_low_hz', 's11_max_db', 'return_loss_min_db', 'iq_max_a', 'nf_max_db', 'gain_tol_db', 'pm_min_deg',
    'r_min_ohm', 'r_max_ohm'];

  // The form (the design's `target` section, so it persists and undoes) and the
  // core's designReport laid out: ranked standard pairs, each with Use.
  const designCard = (container) => {
    const text = (key) => { const v = HR.design.get('target', key); return v === undefined || v === null ? '' : String(v); };
    const bound = (key, opts) => HR.bind('target', key, { compact: true, origin: 'stage', ...opts }).wrap;
    const words = (key) => HR.field('target', key);
    const fields = TARGET.map((key) => bound(key, { label: words(key).label, hint: words(key).hint }));
    const selects = [
      ['gain_kind', [['voltage', 'Voltage, v(out)/v(in)'], ['power', 'Power, GT']], 'voltage'],
      ['series', HR.seriesFacts().map((f) => [f.name, f.name]), 'E24'],
    ].map(([key, options, fallback]) => bound(key, { label: words(key).label, options, fallback }));
    const ticks = ['match_source', 'allow_combinations'].map((key) => bound(key, { tick: words(key).label, compact: false }));
    // Not a value of the design: whether Use takes the capacitors too.
    const caps = { box: el('input', { type: 'checkbox' }) };
    caps.box.checked = true;
    caps.wrap = el('label', { class: 'tick' }, caps.box, ' Use fits these capacitors too');

    const problem = el('div', { class: 'error', 'aria-live': 'polite' });
    const warn = el('p', { class: 'warning', hidden: true });
    const best = el('p', { class: 'design-best' });
    const hand = HR.ui.table('The ideal ratio against the part’s real gain', ['', 'R in', 'R fb', 'Gives', 'Off target']);
    const handNote = el('p', { class: 'plot-note' });
    const capsNote = el('p', { class: 'intro' });
    const list = HR.ui.table('', ['#', 'R in', 'R fb', 'Gain', 'Off target', 'S11', 'Return loss', 'NF', 'Supply current', 'Loop gain', 'Limits met', 'Notes', '']);
    list.node.classList.add('candidates');
    const out = el('div', { class: 'design-out', hidden: true }, warn, best,
      el('div', { class: 'scroll' }, hand.node), handNote, capsNote, caps.wrap, el('div', { class: 'scroll' }, list.node));

    const render = (d) => {
      const series = text('series') || 'E24';
      const target = HR.design.value('target', 'gain_db', 'dB');
      const top = d.candidates[0];
      warn.hidden = d.feasible;
      // `lower f_design` takes the user to the field that does it (the Brief panel).
      const toDesignFrequency = el('a', { href: `#brief${HR.documents.tail}`, onclick: (e) => { e.preventDefault(); HR.goTo('brief', `#${HR.brief.idOf('f_design_hz')}`); } }, 'lower f_design');
      warn.replaceChildren(...(d.feasible ? [] : [`This part cannot reach ${db(target)} at f_design (${HR.fmt(HR.design.value('analysis', 'f_design_hz', 'Hz'), 'Hz', 4)}): its open-loop gain there allows at most ${db(d.ceiling_db)}. The nearest target it can meet is ${db(d.ceiling_db)}; or `, toDesignFrequency, ', or take a faster part.']));
      best.textContent = top ? `Best ${series} pair: R in ${rkm(top.r_in_ohm)}, R fb ${rfb(top)}, giving ${db(top.gain_db)}.${known(d.continuous_r_fb_ohm) ? ` Exact values: R in ${HR.fmt(d.continuous_r_in_ohm, 'Ω', 4)}, R fb ${HR.fmt(d.continuous_r_fb_ohm, 'Ω', 4)}.` : ''}${top.notes.length ? ` Note: ${top.notes.join('; ')}.` : ''}${top.stable ? '' : ' No pair in range gives a stable loop: compensate the loop (Loop panel) or take fewer stages.'}` : `No ${series} pair comes near the target.`;
      const bh = d.by_hand;
      const rows = [[`By hand: the ideal ratio (−R fb/R in = the gain; for a power gain with the source divider), in ${series}`, rkm(bh.r_in_ohm), rfb(bh), db(bh.gain_db), off(bh.error_db)]];
      if (top) rows.push([`Designed with the part’s gain, in ${series}`, rkm(top.r_in_ohm), rfb(top), db(top.gain_db), off(top.error_db)]);
      HR.ui.fillRows(hand.tbody, rows);
      handNote.textContent = `The ideal ratio assumes a part of endless gain. This part’s open-loop gain is finite and falls with frequency, so at f_design the by-hand pair gives ${db(bh.gain_db)}, ${db(Math.abs(bh.error_db))} ${bh.error_db < 0 ? 'short of' : 'over'} the target; the design counts the real gain, phase and all.`;
      const hasCaps = known(d.c_in_f) || known(d.c_out_f);
      const cap = (v) => (known(v) ? HR.fmt(v, 'F', 2) : 'as it is');
      capsNote.textContent = hasCaps ? `Coupling capacitors (E12) for the low corner: C in ${cap(d.c_in_f)}, C out ${cap(d.c_out_f)}, giving a corner at ${HR.fmt(d.f_low_hz, 'Hz', 4)}.`
        : 'Give a low corner to have the coupling capacitors chosen; Use then leaves them as they are.';
      caps.wrap.hidden = !hasCaps;
      capsNote.hidden = !top;
      list.node.querySelector('caption').textContent = `${d.candidates.length} standard pairs from ${series}, best first (Off target: gain minus the target; S11: the two-port’s at z0; Return loss: of the input against the source resistance; Loop gain: |T| at f_design; Limits: a stable loop and the target’s S11, return loss, current and NF limits)`;
      list.node.hidden = !top;
      HR.ui.fillRows(list.tbody, d.candidates.map((c, i) => [String(i + 1), rkm(c.r_in_ohm), rfb(c), db(c.gain_db), off(c.error_db), db(c.s11_db),
        db(c.return_loss_db), db(c.nf_db), HR.fmt(c.iq_a, 'A', 3), known(c.loop_gain) ? HR.fmt(c.loop_gain, '', 3) : '—', c.meets_limits ? 'yes' : 'no', c.notes.join('; '),
        el('button', { type: 'button', class: 'apply', 'aria-label': `Use R in ${rkm(c.r_in_ohm)} and R fb ${rfb(c)}`, onclick: () => {
          const values = { r_in_ohm: asText(c.r_in_ohm, 'R', 'Ω'), r_fb_ohm: asText(c.r_fb_ohm, 'R', 'Ω') };
          if (hasCaps && caps.box.checked) {
            if (known(d.c_in_f)) values.c_in_f = asText(d.c_in_f, 'C', 'F');
            if (known(d.c_out_f)) values.c_out_f = asText(d.c_out_f, 'C', 'F');
          }
          HR.design.setMany('stage', values, `use ${rkm(c.r_in_ohm)} / ${rfb(c)}`, 'stage');
        } }, 'Use')]));
    };

    // Design once asked, then again a pause after each change. It runs in a background
    // worker (20–60 ms natively on the demo, up to half a second for a hard target), so
    // the page keeps answering; Cancel stops it, and a new run replaces the one before.
    let asked = false;
    let timer = null;
    let running = null;
    const busy = el('p', { class: 'busy', hidden: true, role: 'status' }, 'Designing… ',
      el('button', { type: 'button', onclick: () => running && running.cancel() }, 'Cancel'));
    const design = () => {
      clearTimeout(timer);
      asked = true;
      busy.hidden = false;
      running = HR.background.run('designReport', [HR.design.text()], { lane: 'design' });
      const mine = running;
      mine.promise.then((r) => {
        if (running !== mine) return;
        running = null;
        busy.hidden = true;
        if (r.cancelled) return;
        const atField = HR.bind.route(container, r.error || null);
        problem.textContent = r.error && !atField ? HR.words(r.error) : '';
        out.classList.toggle('stale', Boolean(r.error));
        if (r.error) return;
        render(r.ok);
        out.hidden = false;
        container.dataset.designed = String(Number(container.dataset.designed || 0) + 1);
      });
    };
    HR.design.onChange(() => {
      if (!asked) return;
      out.classList.add('stale');
      clearTimeout(timer);
      timer = setTimeout(design, 300);
    });
    const node = card('Design to a target',
      el('p', { class: 'intro' }, 'The gain you want at f_design; Design finds the standard resistor pairs that give it with this part’s real, finite gain, ranked by a stable loop and the limits met, the resistors in charge of the gain (loop gain 3 or more), gain error, noise, match and current. Use puts a pair in the stage (one step to undo).'),
      el('div', { class: 'grid-fields' }, fields.slice(0, 1), selects, fields.slice(1)),
      el('div', { class: 'inputs' }, ticks),
      el('div', { class: 'actions' }, el('button', { type: 'button', onclick: design }, 'Design')), busy, problem, out);
    node.classList.add('wide');
    return { node };
  };

  HR.panel({
    id: 'stage',
    title: 'Stage',
    mount(container) {
      const canvas = el('canvas', { role: 'img', 'aria-label': 'Schematic of the stage' });
      const overlay = el('div', { class: 'schematic-labels' });
      const drawing = el('div', { class: 'schematic' }, canvas, overlay);
      const problem = el('p', { class: 'error', 'aria-live': 'polite' });
      let editing = null;

      const edit = (key, anchor) => {
        const input = el('input', { type: 'text', class: 'in-place', value: raw(key), spellcheck: 'false',
          'aria-label': `${nameOf(key)} (${key}), empty for not fitted`, style: `left:${anchor.x}px;top:${anchor.y}px` });
        editing = key;
        const finish = (commit) => {
          if (editing !== key) return;
          editing = null;
          if (commit && input.value.trim() !== raw(key)) HR.design.set('stage', key, input.value.trim(), 'stage');
          else refresh();
          const again = overlay.querySelector(`[data-key="${key}"]`);
          if (again) again.focus();
        };
        // The key's own action is stopped: focus is back on the value's button by then,
        // and Enter's would press it, opening the box again.
        input.addEventListener('keydown', (e) => {
          if (e.key !== 'Enter' && e.key !== 'Escape') return;
          e.preventDefault();
          finish(e.key === 'Enter');
        });
        input.addEventListener('blur', () => finish(true));
        overlay.append(input);
        input.focus();
        input.select();
      };

      // The drawing is scaled to the card's width, down to MIN_SCALE (its labels would be
      // too small to read below that: it scrolls there instead, as .scroll shows).
      const MIN_SCALE = 0.6;
      // The room is the width the ResizeObserver last reported: reading it from the
      // frame on every edit would force a layout of the page in the middle of the edit.
      const frame = el('div', { class: 'scroll' }, drawing);
      let room = 0;
      const scaleNow = () => (room > 0 ? Math.min(1, Math.max(MIN_SCALE, room / HR.schematic.WIDTH)) : 1);
      let drawnScale = 1;
      const refresh = (error) => {
        drawnScale = scaleNow();
        drawing.style.fontSize = drawnScale === 1 ? '' : `${drawnScale}em`;
        drawing.dataset.scale = String(drawnScale);
        const anchors = HR.schematic.draw(canvas, label, Number(HR.design.get('part', 'stages')) || 1, undefined, drawnScale);
        overlay.replaceChildren(...anchors.map((a) => el('button', {
          type: 'button', class: a.text ? 'value' : 'value ghost', 'data-key': a.key,
          'aria-invalid': error && error.field === `stage.${a.key}` ? 'true' : 'false',
          style: `left:${a.x}px;top:${a.y}px`,
          'aria-label': a.text ? `${a.text.replace(' | ', ' ')}: edit` : `${nameOf(a.key)} not fitted: add`,
          onclick: () => edit(a.key, a),
        }, ...(a.text ? a.text.split(' | ').map((t) => el('span', {}, t)) : [`+ ${nameOf(a.key)}`]))));
      };

      const cells = {};
      const readout = el('dl', { class: 'readout' }, FIGURES.map(([k, text]) => {
        cells[k] = el('dd', { 'data-key': k }, '—');
        return el('div', {}, el('dt', {}, text), cells[k]);
      }));
      const stale = el('p', { class: 'stale-note', hidden: true }, 'Showing the last valid result.');
      const texts = ({ r, b }) => {
        const d = r.design;
        const fmt = HR.fmt;
        return {
          gain: `${fmt(d.gain_db, 'dB')}${d.ideal_gain_db === null ? '' : ` (ideal ${fmt(d.ideal_gain_db, 'dB')})`}`,
          gt: d.power_gain_db === null ? 'needs source and load resistance' : fmt(d.power_gain_db, 'dB'),
          band: `${d.f_low_hz === null ? 'below the sweep' : fmt(d.f_low_hz, 'Hz')} … ${d.f_high_hz === null ? 'above the sweep' : fmt(d.f_high_hz, 'Hz')}`,
          zin: d.zin_re_ohm === null ? '—' : `${fmt(d.zin_re_ohm, 'Ω', 4)} ${d.zin_im_ohm < 0 ? '−' : '+'} j${fmt(Math.abs(d.zin_im_ohm), 'Ω', 3)}`,
          rl: r.return_loss_db === null ? '—' : fmt(r.return_loss_db, 'dB'),
          nf: d.nf_db === null ? 'needs a source resistance' : fmt(d.nf_db, 'dB'),
          iq: fmt(b.iq_a, 'A'),
          diss: fmt(b.dissipation_w, 'W'),
        };
      };
      // What the reference comparison subtracts: [value, how] (HR.compare.figures).
      const DIFFS = {
        gain: ({ r }) => [[r.design.gain_db, 'dB']], gt: ({ r }) => [[r.design.power_gain_db, 'dB']],
        band: ({ r }) => [[r.design.f_low_hz, '×'], [r.design.f_high_hz, '×']],
        zin: ({ r }) => [[r.design.zin_re_ohm, 'Ω'], [r.design.zin_im_ohm, 'Ω']], rl: ({ r }) => [[r.return_loss_db, 'dB']],
        nf: ({ r }) => [[r.design.nf_db, 'dB']], iq: ({ b }) => [[b.iq_a, 'A']], diss: ({ b }) => [[b.dissipation_w, 'W']],
      };
      const render = HR.compare.rerender((now) => {
        const t = texts(now);
        for (const [k] of FIGURES) cells[k].textContent = t[k];
        const [r, b] = [HR.compare.report('responseReport'), HR.compare.report('biasOf')];
        HR.compare.figures(cells, texts, DIFFS, now, r && b && { r, b });
      });

      const target = designCard(container);
      container.append(el('h1', {}, 'Stage'),
        el('p', { class: 'lede' }, 'The components around the part. Click a value (or Tab to it and press Enter) to change it; leave it empty to take the part out. Values take engineering notation or RKM codes (4k7, 100n).'),
        el('div', { class: 'cards' },
          (() => { const c = card('Schematic', frame, problem); c.classList.add('wide'); return c; })(),
          (() => { const c = card('Key figures', stale, HR.health.voids(readout, ['gain', 'gt', 'band', 'zin', 'rl', 'nf']), readout); c.classList.add('wide'); return c; })(),
          target.node));

      // The figures need the sweep and the operating point, both in one run (either
      // error is the answer): on the main thread when the core calls the design quick,
      // else in a worker (a long sweep of many inverters takes far longer than a frame;
      // worker.js). The schematic shows the draft at once, whatever the run.
      let shownError = null;
      refresh(null);
      HR.design.onChange(() => { if (!editing && HR.ui.shown(container)) refresh(shownError); });
      HR.ui.onShown(container, () => refresh(shownError));
      // A window made narrower or wider draws it again at the scale that fits (not while
      // a value is edited in place: that would take its box away).
      new ResizeObserver(() => {
        room = frame.clientWidth;
        if (!editing && HR.ui.shown(container) && scaleNow() !== drawnScale) refresh(shownError);
      }).observe(frame);
      const box = HR.background.runBox('key figures');
      stale.before(box.node);
      box.attach(HR.background.follow(container, {
        job: (text) => HR.compare.along(HR.background.calls([['responseReport', [text]], ['biasOf', [text]]], { lane: 'stage', keep: true, here: HR.background.quick(text) }),
          [['responseReport'], ['biasOf']]),
        delay: 0, quiet: HR.background.QUIET,
        render: (ok, meta) => render({ r: ok[0], b: ok[1] }, meta),
        // The schematic marks the field in error: drawn again only when that changes.
        report: (error) => {
          const field = (e) => (e ? e.field : null);
          if (field(error) !== field(shownError)) refresh(error);
          shownError = error;
          problem.textContent = HR.words(error);
        },
        progress: box.progress,
        stale: box.stale(HR.background.staleMarker(stale, [readout])),
        when: () => !editing,
      }));
    },
  });
})();
