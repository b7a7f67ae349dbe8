'use strict';
// Loop: whether the stage's feedback loop settles, rings or oscillates. The loop gain
// T (Bode's return ratio of stage 1) with its crossover and margins, the Nyquist plot
// of T, the closed-loop poles, the step response and μ, a verdict in plain words, and
// the one-component changes that buy the wanted phase margin (applied as undoable
// edits). Every figure comes from the core's loopReport; this file lays them out,
// with the Bode, step and μ plots on HR.plot and the Nyquist plot and the pole map on
// HR.plane (their renderers in loop-planes.js).

(() => {
  const { el, card } = HR.ui;
  const fmt = HR.fmt;
  const { known, fixed } = HR;
  const deg = (v, decimals = 1) => (known(v) ? `${fixed(v, decimals)}°` : '—');
  const hz = (v, digits = 3) => (known(v) ? fmt(v, 'Hz', digits) : '—');
  const about = (v) => hz(v, 2);
  const css = (name) => HR.plot.css(name);

  // ---- The verdict, in plain words -----------------------------------------------

  const verdictOf = (r) => {
    const s = r.summary;
    const v = s.verdict;
    if (v.kind === 'oscillates' && !known(v.f_hz)) {
      return { head: 'Runs away: a real pole in the right half-plane',
        why: 'A closed-loop pole on the real axis grows: instead of oscillating, the output leaves its bias and runs towards a rail.' };
    }
    if (v.kind === 'oscillates') {
      return { head: `Oscillates at about ${about(v.f_hz)}`,
        why: `A pair of closed-loop poles lies in the right half-plane: the stage oscillates by itself, with or without a signal, until the output clips${known(s.phase_margin_deg) ? ` (phase margin ${deg(s.phase_margin_deg)})` : ''}.` };
    }
    if (v.conditional) {
      // A negative margin with every closed-loop pole decaying: the core's words say why.
      return { head: `Conditionally stable: ${known(v.margin_deg) ? `${fixed(v.margin_deg, 0)}° phase margin` : 'a negative gain margin'}`, why: v.words };
    }
    if (v.kind === 'rings') {
      const margin = known(v.margin_deg) ? `${fixed(v.margin_deg, 0)}° margin, ` : '';
      return { head: `Rings: ${margin}Q ${fixed(v.q, 1)} at about ${about(v.f_hz)}`,
        why: 'Every closed-loop pole decays, so it is stable, but the least-damped pair makes a step ring before it settles, and the gain peaks near that frequency.' };
    }
    if (known(v.margin_deg)) {
      return { head: `Stable: ${fixed(v.margin_deg, 0)}° phase margin`,
        why: `The loop gain falls through 1 at ${hz(s.crossover_hz)} with ${deg(v.margin_deg)} of phase to spare before −180°; every closed-loop pole decays.` };
    }
    return s.no_crossover === 'below_one'
      ? { head: 'Stable, no crossover: the loop gain stays below 1 over the sweep', why: `${s.margin_words} Every closed-loop pole decays.` }
      : { head: 'Stable, no crossover within the sweep', why: `${s.margin_words} Every closed-loop pole decays.` };
  };

  // μ to three decimals, or five when that close to 1 (so "μ > 1" never reads "1.000").
  const muText = (m) => fixed(m, Math.abs(m - 1) < 5e-4 ? 5 : 3);

  const muLine = (r) => {
    const m = r.summary.mu_min;
    if (!known(m)) return 'μ could not be computed over the sweep.';
    if (m > 1) return `μ > 1 at every frequency of the sweep (lowest ${muText(m)}): no passive source or load makes the two-port oscillate.`;
    const i = r.mu.indexOf(m);
    const at = i >= 0 ? ` near ${about(r.f_hz[i])}` : '';
    return `μ < 1${at} (lowest ${muText(m)}): some source or load impedances can make the two-port oscillate, even if the stage as designed does not.`;
  };

  // ---- Figures -----------------------------------------------------------------

  const FIGURES = [
    ['t_mid', 'Loop gain at f_design'], ['crossover', 'Crossover (|T| = 1)'], ['pm', 'Phase margin'],
    ['gm', 'Gain margin'], ['peaking', 'Closed-loop peaking'], ['pair', 'Least-damped pole pair'],
    ['overshoot', 'Step overshoot'], ['settling', 'Settling to ±2 %'], ['mu_min', 'Lowest μ'],
  ];

  const figureTexts = (r) => {
    const s = r.summary;
    const p = s.least_damped;
    return {
      t_mid: `${known(s.t_mid_db) ? fmt(s.t_mid_db, 'dB') : '—'} ∠ ${deg(s.t_mid_phase_deg)}`,
      crossover: known(s.crossover_hz) ? `${hz(s.crossover_hz)}${s.crossovers > 1 ? ` (worst of ${s.crossovers})` : ''}` : (s.no_crossover === 'below_one' ? 'none (|T| < 1 over the sweep)' : 'none within the sweep'),
      pm: known(s.phase_margin_deg) ? deg(s.phase_margin_deg) : '— (no crossover)',
      gm: known(s.gain_margin_db) ? `${fmt(s.gain_margin_db, 'dB')} at ${hz(s.phase_crossover_hz)}` : '— (phase stays above −180°)',
      peaking: known(s.peaking_db) ? fmt(s.peaking_db, 'dB') : '—',
      pair: p ? `${hz(p.f_n_hz)} · ζ ${fixed(p.zeta, 3)} · Q ${fixed(p.q, 2)}` : 'none (all poles real)',
      overshoot: !s.stable ? 'grows (unstable)' : known(s.overshoot_pct) ? fmt(s.overshoot_pct, '%') : '—',
      settling: !s.stable ? 'never (grows)' : known(s.settling_s) ? fmt(s.settling_s, 's') : 'not within the step window',
      mu_min: known(s.mu_min) ? muText(s.mu_min) : '—',
    };
  };

  // What the reference comparison subtracts: [value, how] (HR.compare.figures).
  const DIFFS = {
    t_mid: ({ summary: s }) => [[s.t_mid_db, 'dB'], [s.t_mid_phase_deg, '°']], crossover: ({ summary: s }) => [[s.crossover_hz, '×']],
    pm: ({ summary: s }) => [[s.phase_margin_deg, '°']], gm: ({ summary: s }) => [[s.gain_margin_db, 'dB']],
    peaking: ({ summary: s }) => [[s.peaking_db, 'dB']], pair: ({ summary: s }) => [[s.least_damped && s.least_damped.f_n_hz, '×']],
    overshoot: ({ summary: s }) => [[s.overshoot_pct, '%']], settling: ({ summary: s }) => [[s.settling_s, '×']],
    mu_min: ({ summary: s }) => [[s.mu_min, '']],
  };

  // ---- The compensation helper -------------------------------------------------

  // The components the helper changes, each with its RKM kind (its label and unit
  // from the core's catalogue, HR.field).
  const KNOBS = { c_fb_f: 'C', r_out_ohm: 'R', r_fb_ohm: 'R' };
  const knobName = (key) => (KNOBS[key] ? HR.field('stage', key).label : key);

  // A standard value as the Stage panel shows it (RKM code for a resistor, engineering
  // notation for a capacitor, with the coarsest E-series it belongs to), and the text
  // to put in the design: the RKM code when it reads back as exactly the value.
  const valueOf = (key, v) => {
    const [unit, kind] = KNOBS[key] ? [HR.field('stage', key).unit, KNOBS[key]] : ['', 'R'];
    const rkm = HR.rkm(v, kind);
    const shown = unit === 'Ω' ? rkm || fmt(v, unit, 3) : fmt(v, unit, 3);
    const coarsest = HR.seriesOf(v);
    const series = coarsest ? ` · ${coarsest}` : '';
    const back = rkm ? HR.call('parseValue', rkm, unit, `stage.${key}`) : { error: true };
    return { shown: `${shown}${series}`, text: back.ok && back.ok.value === v ? rkm : v };
  };

  const capitalised = (t) => t.charAt(0).toUpperCase() + t.slice(1);
  const change = (before, after) => `${before} → ${after}`;

  // ---- Bode-plot annotations (uPlot decorations) -----------------------------------

  // A vertical span from y0 to y1 at x, with an arrowhead at y1 and a label: a margin.
  // Solid, whatever dash uPlot left on the context (a reference's dashed twin is drawn
  // last, and uPlot does not reset its dash before the draw hooks).
  const span = (u, ctx, x, y0, y1, colour, text) => {
    if (!known(x) || x < u.scales.x.min || x > u.scales.x.max) return;
    const dpr = devicePixelRatio;
    const px = u.valToPos(x, 'x', true);
    const [p0, p1] = [u.valToPos(y0, 'y', true), u.valToPos(y1, 'y', true)];
    ctx.save();
    ctx.setLineDash([]);
    ctx.strokeStyle = colour;
    ctx.fillStyle = colour;
    ctx.lineWidth = 2 * dpr;
    ctx.beginPath();
    ctx.moveTo(px, p0);
    ctx.lineTo(px, p1);
    ctx.stroke();
    const head = (py, dir) => {
      ctx.beginPath();
      ctx.moveTo(px, py);
      ctx.lineTo(px - 4 * dpr, py - dir * 7 * dpr);
      ctx.lineTo(px + 4 * dpr, py - dir * 7 * dpr);
      ctx.closePath();
      ctx.fill();
    };
    if (Math.abs(p1 - p0) > 14 * dpr) head(p1, Math.sign(p1 - p0));
    ctx.font = `bold ${12 * dpr}px sans-serif`;
    const right = px < u.bbox.left + u.bbox.width * 0.75;
    ctx.textAlign = right ? 'left' : 'right';
    const ty = Math.min(Math.max((p0 + p1) / 2 + 4 * dpr, u.bbox.top + 40 * dpr), u.bbox.top + u.bbox.height - 6 * dpr);
    HR.plot.halo(ctx, text, px + (right ? 7 : -7) * dpr, ty);
    ctx.restore();
  };

  // A y range that takes in the data and the given levels (HR.plot's).
  const { including } = HR.plot;

  HR.panel({
    id: 'loop',
    title: 'Loop',
    mount(container) {
      let last = null;

      // Verdict.
      const head = el('p', { class: 'verdict-head', 'aria-live': 'polite' }, '—');
      const why = el('p', { class: 'verdict-why' });
      const mu = el('p', { class: 'verdict-mu' });
      const openWarn = el('p', { class: 'warning', hidden: true });
      const problem = el('p', { class: 'error', 'aria-live': 'polite', hidden: true });
      const stale = el('p', { class: 'stale-note', hidden: true }, 'Showing the last valid result.');
      const verdictBox = el('div', { class: 'verdict' }, head, why, mu, openWarn);
      const verdictCard = card('Verdict', verdictBox, stale, problem);
      verdictCard.classList.add('wide');

      // Figures.
      const cells = {};
      const readout = el('dl', { class: 'readout' }, FIGURES.map(([k, text]) => {
        cells[k] = el('dd', { 'data-key': k }, '—');
        return el('div', {}, el('dt', {}, text), cells[k]);
      }));
      const figuresCard = card('Loop figures', readout);
      figuresCard.classList.add('wide');

      // Helper.
      const helperIntro = el('p', { class: 'intro' });
      const helperBody = el('tbody');
      const helperTable = el('table', { class: 'helper' },
        el('caption', {}, 'Changes that keep the gain within its tolerance first (each alone, then a feedback capacitor with an output resistor), then those that move it, flagged; each the smallest standard value that reaches the margin'),
        el('thead', {}, el('tr', {}, ['Change', 'Value', 'Phase margin', 'Gain at f_design', 'Upper band edge', ''].map((h) => el('th', { scope: 'col' }, h)))),
        helperBody);
      const helperWrap = el('div', { class: 'scroll' }, helperTable);
      const helperCard = card('Compensation', helperIntro, helperWrap);
      helperCard.classList.add('wide');

      // Plots.
      const plotsCard = card('Loop gain, Nyquist, poles, step and μ', el('p', { class: 'intro' },
        'T is the loop gain: the signal returned to stage 1’s input, per volt injected there, with the source switched off. Hover for values; drag to zoom, shift-drag (or the arrow keys on a focused plot) to pan, Ctrl+wheel or +/− to zoom, double-click (or 0) to reset.'));
      plotsCard.classList.add('wide');
      const row = el('div', { class: 'plots' });
      plotsCard.append(row);
      // Each plot in a cell with a one-line note under it saying what it shows.
      const cell = () => row.appendChild(el('div', { class: 'plot-cell' }));
      const note = (c, text) => c.appendChild(el('p', { class: 'plot-note' }, text));

      const freq = { label: 'Frequency', unit: 'Hz' };
      const commonMarks = (u, ctx) => {
        const s = last.summary;
        HR.plot.vline(u, ctx, last.f_design_hz, css('--plot-2'), 'f_design', 1);
        HR.plot.vline(u, ctx, s.crossover_hz, css('--plot-4'), 'crossover');
        HR.plot.vline(u, ctx, s.phase_crossover_hz, css('--plot-3'), '−180°', 2);
      };
      const magMarks = (u, ctx) => {
        if (!last) return;
        const s = last.summary;
        commonMarks(u, ctx);
        HR.plot.hline(u, ctx, 0, css('--ink'), '|T| = 1 (0 dB)', 'left');
        if (known(s.crossover_hz)) HR.plot.marker(u, ctx, s.crossover_hz, 0, css('--plot-4'));
        if (known(s.gain_margin_db)) span(u, ctx, s.phase_crossover_hz, -s.gain_margin_db, 0, css('--plot-3'), `GM ${fmt(s.gain_margin_db, 'dB')}`);
      };
      const phaseMarks = (u, ctx) => {
        if (!last) return;
        const s = last.summary;
        commonMarks(u, ctx);
        HR.plot.hline(u, ctx, -180, css('--ink'), '−180°', 'left');
        if (known(s.phase_crossover_hz)) HR.plot.marker(u, ctx, s.phase_crossover_hz, -180, css('--plot-3'));
        if (known(s.phase_margin_deg) && known(s.pm_reference_deg)) {
          // The margin drawn from the line the core measures it from (drawn too, when
          // it is not the −180° line above).
          const ref = s.pm_reference_deg;
          if (ref !== -180) HR.plot.hline(u, ctx, ref, css('--ink'), `${fixed(ref, 0)}°`, 'left');
          span(u, ctx, s.crossover_hz, ref, ref + s.phase_margin_deg, css('--plot-4'), `PM ${deg(s.phase_margin_deg)}`);
        }
      };
      const stepMarks = (u, ctx) => {
        if (!last) return;
        const t = last.step_target_v;
        const settle = last.summary.settling_band;
        if (settle) HR.plot.band(u, ctx, settle[0], settle[1], css('--window'));
        HR.plot.hline(u, ctx, t, css('--plot-2'), `target ${fmt(t, '', 3)} V/V`);
      };
      const muMarks = (u, ctx) => {
        if (!last) return;
        HR.plot.hline(u, ctx, 1, css('--bad'), 'μ = 1');
        HR.plot.vline(u, ctx, last.f_design_hz, css('--plot-2'), 'f_design', 1);
      };

      const magCell = cell();
      const magPlot = HR.plot.create(magCell, { title: 'Loop gain |T|', file: 'halfrail-loop-gain', x: freq, logX: true,
        y: { label: '|T|', unit: 'dB', range: including(0) }, decorate: magMarks, series: [{ label: '|T|', unit: 'dB' }] });
      note(magCell, '|T| against frequency. A crossover is where |T| falls through 0 dB (anywhere in the sweep; the one with the least phase margin is marked); GM is how far |T| is below 0 dB where the phase passes −180° nearest it.');
      const phaseCell = cell();
      const phasePlot = HR.plot.create(phaseCell, { title: 'Phase of the loop gain ∠T', file: 'halfrail-loop-phase', x: freq, logX: true,
        y: { label: '∠T', unit: '°', range: including(-180) }, decorate: phaseMarks, series: [{ label: '∠T (°)', unit: '' }] });
      note(phaseCell, 'Phase of T, carried continuously from the bottom of the sweep. PM is how far the phase is above −180° at the crossover.');
      const nyqCell = cell();
      const nyquistPlot = HR.plane.create(nyqCell, HR.loopPlanes.nyquist());
      note(nyqCell, 'T over the sweep (solid, an arrow at each decade; dashed: negative frequencies). Radius drawn as log₂(1 + |T|): |T| = 1 stays the unit circle, angles are true, ticks give T on the real axis. Encircling −1 means growing closed-loop poles, when the broken loop has none.');
      const poleCell = cell();
      const polePlot = HR.plane.create(poleCell, HR.loopPlanes.poles());
      const poleNote = note(poleCell, '');
      const stepCell = cell();
      let stepClip = null;
      const stepPlot = HR.plot.create(stepCell, { title: 'Step response', file: 'halfrail-step', x: { label: 'Time', unit: 's' },
        y: { label: 'v(out) per volt of step', unit: 'V/V', range: (u, lo, hi) => (stepClip ? stepClip : including(0, last && last.step_target_v)(u, lo, hi)) },
        decorate: stepMarks, series: [{ label: 'v(out)', unit: '' }] });
      const stepNote = note(stepCell, '');
      const muCell = cell();
      const muPlot = HR.plot.create(muCell, { title: 'Stability factor μ', file: 'halfrail-mu', x: freq, logX: true,
        y: { label: 'μ', unit: '', range: including(1) }, decorate: muMarks, series: [{ label: 'μ', unit: '' }] });
      note(muCell, 'Edwards–Sinsky μ of the stage as a two-port (source and load taken off). Where μ > 1, no passive source or load can make it oscillate.');

      const renderHelper = (r) => {
        const s = r.summary;
        const wanted = `${fixed(r.wanted_margin_deg, 0)}°`;
        const asked = `the target’s “${HR.field('target', 'pm_min_deg').label}”`;
        helperWrap.hidden = r.suggestions.length === 0;
        if (!r.suggestions.length) {
          helperIntro.textContent = `${r.helper_words} The margin asked for is ${asked}, or 60° when the target sets none.`;
          helperBody.replaceChildren();
          return;
        }
        helperIntro.textContent = `The loop has ${known(s.phase_margin_deg) ? deg(s.phase_margin_deg) : 'no measurable'} phase margin; ${wanted} is wanted (${asked}, or 60° when it sets none). ${r.helper_words} Apply puts the values into the stage; Undo (in the Design bar, or Ctrl+Z) takes them back.`;
        const pmNow = known(s.phase_margin_deg) ? deg(s.phase_margin_deg) : (s.stable ? 'no crossover' : 'unstable');
        helperBody.replaceChildren(...r.suggestions.map((g) => {
          const found = g.changes.length > 0;
          // Each change of the suggestion (two for a pair), shown and as the text to set.
          const vs = g.changes.map((c) => ({ key: c.key, ...valueOf(c.key, c.value) }));
          const shown = vs.map((v) => (vs.length > 1 ? `${knobName(v.key)} ${v.shown}` : v.shown)).join(' + ');
          const label = vs.map((v) => `${knobName(v.key)} = ${v.shown}`).join(', ');
          const apply = found ? el('button', { type: 'button', class: 'apply', 'aria-label': `Apply ${label}`,
            onclick: () => (vs.length === 1
              ? HR.design.set('stage', vs[0].key, vs[0].text, 'loop')
              : HR.design.setMany('stage', Object.fromEntries(vs.map((v) => [v.key, v.text])), `apply ${label}`, 'loop')) }, 'Apply') : '';
          const gain = found ? change(fmt(g.was_gain_db, 'dB'), known(g.gain_db) ? fmt(g.gain_db, 'dB') : '—') : '—';
          return el('tr', { 'data-key': g.key, 'data-flagged': g.flag ? 'true' : 'false' },
            el('th', { scope: 'row' }, capitalised(g.what)),
            el('td', {}, found ? shown : 'none in range'),
            el('td', {}, found ? change(pmNow, known(g.phase_margin_deg) ? deg(g.phase_margin_deg) : 'no crossover') : '—'),
            el('td', {}, g.flag ? `${gain} — ${g.flag}` : gain),
            el('td', {}, found ? change(known(g.was_f_high_hz) ? hz(g.was_f_high_hz) : 'above the sweep', known(g.f_high_hz) ? hz(g.f_high_hz) : 'above the sweep') : '—'),
            el('td', {}, apply));
        }));
      };

      const render = HR.compare.rerender((r) => {
        last = r;
        const ref = HR.compare.report('loopReport');
        const s = r.summary;
        const v = verdictOf(r);
        verdictBox.dataset.kind = s.verdict.kind;
        head.textContent = v.head;
        why.textContent = v.why;
        mu.textContent = muLine(r);
        openWarn.hidden = !(s.open_loop_growing > 0);
        openWarn.textContent = s.open_loop_growing > 0
          ? `With the loop broken at stage 1, the circuit itself has ${s.open_loop_growing} growing natural frequenc${s.open_loop_growing === 1 ? 'y' : 'ies'} (an inner loop through the part’s capacitances), so the margins and the Nyquist plot do not describe stability here. The closed-loop poles still decide the verdict.`
          : '';
        const texts = figureTexts(r);
        for (const [k] of FIGURES) cells[k].textContent = texts[k];
        HR.compare.figures(cells, figureTexts, DIFFS, r, ref);
        renderHelper(r);

        magPlot.setData([r.f_hz, r.t_db], ref && [ref.f_hz, ref.t_db]);
        phasePlot.setData([r.f_hz, r.t_phase_deg], ref && [ref.f_hz, ref.t_phase_deg]);
        nyquistPlot.setData(HR.loopPlanes.nyquistData(r, ref));
        const poles = HR.loopPlanes.poleData(r, ref);
        polePlot.setData(poles);
        poleNote.textContent = `The closed loop’s natural frequencies s/2π (×). In the shaded right half-plane they grow; the further left, the faster they decay. Both axes are logarithmic either side of 0, linear within ±${fmt(poles.scale.L, 'Hz', 1)}.`;
        const n = Math.min(r.step_t_s.length, r.step_v.length);
        // A growing step would squash the target out of sight: the plot stops at three
        // times the target level, and the note says so.
        const t = r.step_target_v;
        stepClip = s.stable ? null : [Math.min(0, t) - 2 * Math.abs(t), Math.max(0, t) + 2 * Math.abs(t)];
        stepNote.textContent = s.stable
          ? 'Output of the closed loop for a 1 V step of the source EMF (small signal, linear model). Dashed: the level it should settle at; shaded: ±2 % of it.'
          : 'Output for a 1 V step of the source EMF: it grows without settling and leaves the plot, which stops at three times the target level (dashed). The model is linear; a real stage swings into its rails.';
        const m = ref && Math.min(ref.step_t_s.length, ref.step_v.length);
        stepPlot.setData([r.step_t_s.slice(0, n), r.step_v.slice(0, n)], ref && [ref.step_t_s.slice(0, m), ref.step_v.slice(0, m)]);
        muPlot.setData([r.f_hz, r.mu], ref && [ref.f_hz, ref.mu]);
      });

      container.append(el('h1', {}, 'Loop'),
        el('p', { class: 'lede' }, 'Whether the stage’s feedback loop settles, rings or oscillates: the loop gain with its crossover and margins, the Nyquist plot, the closed-loop poles, the step response and μ, with one-component changes that buy the phase margin.'),
        el('div', { class: 'cards' }, verdictCard, figuresCard, helperCard, plotsCard));
      // In a worker: the compensation helper alone re-solves the loop for every
      // candidate value, far longer than a frame on a many-inverter part (worker.js).
      const box = HR.background.runBox('loop analysis');
      verdictCard.querySelector('h2').after(box.node);
      box.attach(HR.background.follow(container, {
        job: (text) => HR.compare.along(HR.background.run('loopReport', [text], { lane: 'loop', keep: true }), [['loopReport']]),
        delay: 0, quiet: HR.background.QUIET,
        render,
        report: (error) => {
          problem.textContent = HR.words(error);
          problem.hidden = !error;
        },
        progress: box.progress,
        stale: box.stale(HR.background.staleMarker(stale, [verdictBox, readout, helperWrap])),
      }));
    },
  });
})();
