'use strict';
// Crystal: the part as a Pierce crystal oscillator (SPEC §3.5). The crystal's and the
// circuit's fields (the document's `crystal` and `oscillator` sections, each an
// HR.bind field from the core's catalogue), a schematic of the circuit drawn from
// them, the core's figures and warnings, and four plots: the negative resistance
// against gm, the same impedance in the complex plane as gm varies, the frequency
// error against the load, and the start-up envelope. The report and the curves are
// computed in a worker (crystalReport takes the steady state: tens of milliseconds),
// each with the pinned reference's (HR.compare) beside it. The design helper and the
// spread are cards of their own (crystal_design.js, crystal_spread.js). A document
// without the sections gets a word of explanation and a button that adds the demo's
// oscillator as one step of undo.

(() => {
  const { el, card } = HR.ui;
  const fmt = HR.fmt;
  const { known, fixed } = HR;
  const css = (name) => HR.plot.css(name);
  const { label: planeLabel, ring: planeRing, axisLabels } = HR.plane;

  const CRYSTAL = ['f_hz', 'cl_f', 'esr_ohm', 'c0_f', 'cm_f', 'pull_ppm_per_pf', 'drive_max_w'];
  const CIRCUIT = ['c1_f', 'c2_f', 'rf_ohm', 'rs_ohm', 'c_stray_f', 'margin_min'];

  const FIGURES = [
    ['f_osc', 'Oscillation frequency (small signal)'], ['pull', 'Frequency error from the nominal'],
    ['f_steady', 'Frequency at the steady amplitude'], ['f_s', 'Series resonance f_s'],
    ['cl_eff', 'Load the circuit presents'], ['r_neg', 'Negative resistance at f_osc'],
    ['margin', 'Start-up margin −R/ESR'], ['gm', 'Part’s gm against the critical gm'],
    ['tau', 'Start-up time constant τ'], ['spurious', 'Without the crystal'],
    ['drive', 'Drive level in the crystal'], ['im', 'Crystal current (peak)'],
    ['vpp_gate', 'Swing at the gate'], ['vpp_out', 'Swing at the part’s output'],
  ];

  // A frequency to nine figures (a ppm shows in them), its decimals in groups of three
  // with thin spaces, as ISO 80000 writes long numbers: 12.800 073 5 MHz.
  const hz = (v) => (known(v) ? fmt(v, 'Hz', 9).replace(/\.(\d+)/, (all, d) => `.${d.match(/\d{1,3}/g).join('\u2009')}`) : '—');
  const ppm = (v) => (known(v) ? `${v > 0 ? '+' : ''}${fixed(v, 2)} ppm` : '—');

  // Each figure: [text, the value it shows (for data-value), a note under it].
  const texts = (r) => {
    const nominal = HR.design.value('crystal', 'f_hz', 'Hz');
    const cl = HR.design.value('crystal', 'cl_f', 'F');
    const steadyPpm = known(r.f_steady_hz) && known(nominal) ? (1e6 * (r.f_steady_hz - nominal)) / nominal : null;
    const withheld = r.large_withheld ? 'no steady state' : '—';
    const ratio = known(r.gm_crit_s) ? r.gm_s / r.gm_crit_s : null;
    return {
      f_osc: [hz(r.f_osc_hz), r.f_osc_hz],
      pull: [ppm(r.pull_ppm), r.pull_ppm, known(r.trim_ppm_per_pf) ? `trim sensitivity ${fixed(r.trim_ppm_per_pf, 1)} ppm/pF there` : ''],
      f_steady: [known(r.f_steady_hz) ? hz(r.f_steady_hz) : withheld, r.f_steady_hz, known(steadyPpm) ? `${ppm(steadyPpm)} from the nominal` : ''],
      f_s: [hz(r.f_s_hz), r.f_s_hz, `parallel resonance ${hz(r.f_p_hz)}`],
      cl_eff: [fmt(r.cl_eff_f, 'F', 3), r.cl_eff_f, known(cl) ? `against ${fmt(cl, 'F', 3)} the crystal is specified at` : 'the crystal is specified at series resonance'],
      r_neg: [fmt(r.r_neg_ohm, 'Ω', 3), r.r_neg_ohm, `against the ESR, ${fmt(r.equivalent.rm_ohm, 'Ω', 3)}`],
      margin: [fixed(r.margin, 2), r.margin, `${r.margin >= r.margin_min ? 'meets' : 'below'} the ${fixed(r.margin_min, 1)} wanted`],
      gm: [fmt(r.gm_s, 'S', 3), r.gm_s, known(r.gm_crit_s) ? `critical ${fmt(r.gm_crit_s, 'S', 3)}: ${fixed(ratio, 1)} times over` : 'no gm makes it start'],
      tau: [known(r.tau_s) ? fmt(r.tau_s, 's', 3) : 'does not start', r.tau_s, known(r.tau_s) ? `about ${fmt(r.tau_s * Math.log(1e3), 's', 2)} for 60 dB of growth` : ''],
      spurious: [r.spurious_hz === null ? 'stable' : r.spurious_hz > 0 ? `oscillates at ${fmt(r.spurious_hz, 'Hz', 3)}` : 'runs away (latches)', r.spurious_hz,
        r.spurious_hz === null ? 'the circuit rings only through the crystal' : 'a buffered part rings by itself'],
      drive: [known(r.drive_w) ? fmt(r.drive_w, 'W', 3) : withheld, r.drive_w,
        (() => { const max = HR.design.value('crystal', 'drive_max_w', 'W'); return known(max) && known(r.drive_w) ? `${fixed((100 * r.drive_w) / max, 0)} % of the ${fmt(max, 'W', 3)} rated` : 'no rating given'; })()],
      im: [known(r.im_a) ? fmt(r.im_a, 'A', 3) : withheld, r.im_a],
      vpp_gate: [known(r.vpp_gate_v) ? `${fmt(r.vpp_gate_v, 'V', 3)} p-p` : withheld, r.vpp_gate_v, known(r.gate_shift_v) ? `bias moved ${fmt(r.gate_shift_v, 'V', 2)} under drive` : ''],
      vpp_out: [known(r.vpp_out_v) ? `${fmt(r.vpp_out_v, 'V', 3)} p-p` : withheld, r.vpp_out_v],
    };
  };

  // What the reference comparison subtracts: [value, how] (HR.compare.figures).
  const DIFFS = {
    f_osc: (r) => [[r.f_osc_hz, 'Hz']], pull: (r) => [[r.pull_ppm, 'ppm']], f_steady: (r) => [[r.f_steady_hz, 'Hz']], f_s: (r) => [[r.f_s_hz, 'Hz']],
    cl_eff: (r) => [[r.cl_eff_f, 'F']], r_neg: (r) => [[r.r_neg_ohm, 'Ω']], margin: (r) => [[r.margin, '']], gm: (r) => [[r.gm_s, 'S']],
    tau: (r) => [[r.tau_s, '×']], drive: (r) => [[r.drive_w, 'W']], im: (r) => [[r.im_a, 'A']], vpp_gate: (r) => [[r.vpp_gate_v, 'V']], vpp_out: (r) => [[r.vpp_out_v, 'V']],
  };
  const locusPoints = (g) => g.z_re_ohm.map((re, i) => (known(re) && known(g.z_im_ohm[i]) ? [re, g.z_im_ohm[i]] : null));

  // ---- The schematic, in SVG ---------------------------------------------------------
  const SVG = 'http://www.w3.org/2000/svg';
  const svg = (tag, attrs = {}, ...children) => {
    const node = document.createElementNS(SVG, tag);
    for (const [k, v] of Object.entries(attrs)) if (v !== null && v !== undefined) node.setAttribute(k, String(v));
    for (const c of children) node.append(c);
    return node;
  };
  const wire = (...pts) => svg('polyline', { points: pts.map((p) => p.join(',')).join(' '), fill: 'none' });
  const ground = (x, y) => svg('g', {}, wire([x, y], [x, y + 8]), wire([x - 9, y + 8], [x + 9, y + 8]), wire([x - 6, y + 12], [x + 6, y + 12]), wire([x - 3, y + 16], [x + 3, y + 16]));
  const resistor = (x1, x2, y) => {
    const m = (x1 + x2) / 2;
    const pts = [[x1, y], [m - 18, y]];
    for (let i = 1; i < 6; i++) pts.push([m - 18 + 6 * i, y + (i % 2 ? -6 : 6)]);
    pts.push([m + 18, y], [x2, y]);
    return wire(...pts);
  };
  // A capacitor from (x, y1) down to (x, y2).
  const capDown = (x, y1, y2) => {
    const m = (y1 + y2) / 2;
    return svg('g', {}, wire([x, y1], [x, m - 3]), wire([x - 11, m - 3], [x + 11, m - 3]), wire([x - 11, m + 3], [x + 11, m + 3]), wire([x, m + 3], [x, y2]));
  };
  const text = (x, y, t, anchor = 'middle') => svg('text', { x, y, 'text-anchor': anchor }, t);
  const dot = (x, y) => svg('circle', { cx: x, cy: y, r: 3, class: 'dot' });

  // The value of a field as the schematic writes it ('' when empty or bad).
  const shown = (section, key) => {
    const { unit } = HR.field(section, key);
    const v = HR.design.value(section, key, unit);
    if (!known(v)) return '';
    return unit === 'Ω' ? HR.rkm(v, 'R') || fmt(v, 'Ω', 3) : fmt(v, unit, 3);
  };

  const schematic = () => {
    const [gx, ox, xx, top, mid, low] = [110, 290, 410, 34, 96, 196];
    const rs = HR.design.value('oscillator', 'rs_ohm', 'Ω');
    const stray = HR.design.value('oscillator', 'c_stray_f', 'F');
    const stages = Number(HR.design.get('part', 'stages')) || 1;
    const parts = [
      // The inverter between g and o, Rf above it.
      wire([gx, mid], [170, mid]), svg('polygon', { points: `170,${mid - 20} 220,${mid} 170,${mid + 20}`, fill: 'none' }),
      svg('circle', { cx: 225, cy: mid, r: 5, fill: 'none' }), wire([230, mid], [ox, mid]),
      text(188, mid + 4, stages > 1 ? `×${stages}` : ''),
      wire([gx, mid], [gx, top]), wire([ox, mid], [ox, top]), resistor(gx, ox, top), text((gx + ox) / 2, top - 12, `Rf ${shown('oscillator', 'rf_ohm')}`),
      // Rs from o to x (a wire when absent or 0).
      known(rs) && rs > 0 ? resistor(ox, xx, mid) : wire([ox, mid], [xx, mid]),
      known(rs) && rs > 0 ? text((ox + xx) / 2, mid - 14, `Rs ${shown('oscillator', 'rs_ohm')}`) : text((ox + xx) / 2, mid - 8, 'no Rs'),
      // The crystal between x and g, below.
      wire([gx, mid], [gx, low]), wire([xx, mid], [xx, low]),
      wire([gx, low], [243, low]), wire([243, low - 14], [243, low + 14]), svg('rect', { x: 249, y: low - 12, width: 22, height: 24, fill: 'none' }),
      wire([277, low - 14], [277, low + 14]), wire([277, low], [xx, low]),
      text(260, low - 20, `${shown('crystal', 'f_hz')}`),
      text(260, low + 30, `ESR ${shown('crystal', 'esr_ohm')}, C0 ${shown('crystal', 'c0_f')}`),
      // C1 and C2 to ground.
      capDown(gx, low, low + 44), ground(gx, low + 44), text(gx - 16, low + 26, `C1 ${shown('oscillator', 'c1_f')}`, 'end'),
      capDown(xx, low, low + 44), ground(xx, low + 44), text(xx + 16, low + 26, `C2 ${shown('oscillator', 'c2_f')}`, 'start'),
      dot(gx, mid), dot(ox, mid), dot(xx, mid), dot(gx, low), dot(xx, low),
      text(gx - 8, mid - 6, 'g', 'end'), text(ox + 6, mid + 16, 'o', 'start'), text(xx + 8, mid - 6, 'x', 'start'),
    ];
    if (known(stray) && stray > 0) {
      const y = low - 50;
      parts.push(svg('g', { class: 'stray' }, wire([gx, y], [254, y]), wire([254, y - 8], [254, y + 8]), wire([266, y - 8], [266, y + 8]), wire([266, y], [xx, y])),
        text(260, y - 12, `stray ${shown('oscillator', 'c_stray_f')}`));
    }
    const describe = `Pierce oscillator: the part from g to o with Rf across it, ${known(rs) && rs > 0 ? 'Rs from o to x' : 'o joined to x'}, the crystal from x to g, C1 from g and C2 from x to ground.`;
    return svg('svg', { viewBox: '0 0 520 270', width: 520, height: 270, role: 'img', 'aria-label': describe, class: 'crystal-schematic' }, ...parts);
  };

  // ---- The locus: Z_c in the complex plane as gm varies ------------------------------
  const niceStep = (span) => {
    const raw = span / 5;
    const p = 10 ** Math.floor(Math.log10(raw));
    return [1, 2, 5, 10].map((m) => m * p).find((s) => s >= raw) || p * 10;
  };
  const locus = () => ({
    title: 'Z_c in the complex plane as gm varies (Vittoz locus)',
    file: 'halfrail-crystal-locus',
    height: 300,
    square: true,
    idle: (d) => `The part’s own gm is ringed; the crystal starts left of −ESR. Hover the curve for gm and Z_c.`,
    home: (d) => {
      const all = [...d.points, ...(d.ref || [])].filter(Boolean);
      const xs = [...all.map((p) => p[0]), 0, -d.c.target_ohm];
      const ys = [...all.map((p) => p[1]), 0];
      const [x0, x1, y0, y1] = [Math.min(...xs), Math.max(...xs), Math.min(...ys), Math.max(...ys)];
      const pad = 0.08 * Math.max(x1 - x0, y1 - y0, 1);
      return [x0 - pad, x1 + pad, y0 - pad, y1 + pad];
    },
    draw: (ctx, P, d) => {
      const muted = css('--muted');
      ctx.save();
      ctx.strokeStyle = css('--line');
      ctx.beginPath();
      ctx.moveTo(P.box.l, P.y(0)); ctx.lineTo(P.box.l + P.box.w, P.y(0));
      ctx.moveTo(P.x(0), P.box.t); ctx.lineTo(P.x(0), P.box.t + P.box.h);
      ctx.stroke();
      // Re Z_c = −Rm and −margin_min·Rm: where it starts, and where it starts with margin.
      for (const [re, colour, words, row] of [[-d.c.rm_ohm, css('--bad'), '−ESR', 0], [-d.c.target_ohm, css('--plot-3'), `−${fixed(d.c.target_ohm / d.c.rm_ohm, 1)}·ESR`, 1]]) {
        ctx.strokeStyle = colour;
        ctx.setLineDash([5, 4]);
        ctx.beginPath();
        ctx.moveTo(P.x(re), P.box.t); ctx.lineTo(P.x(re), P.box.t + P.box.h);
        ctx.stroke();
        planeLabel(ctx, words, P.x(re) + 4, P.box.t + 14 + 14 * row, colour, 'left', P);
      }
      // The reference's locus, under this design's.
      if (d.ref) {
        HR.plane.polyline(ctx, P, d.ref, { colour: muted, width: 1.5, dash: [6, 4] });
        planeLabel(ctx, '- - reference', P.box.l + 6, P.box.t + P.box.h - 8, muted, 'left', P);
      }
      HR.plane.polyline(ctx, P, d.points, { colour: css('--plot-1'), width: 2 });
      ctx.restore();
      const [re, im] = d.c.z_c;
      planeRing(ctx, P.x(re), P.y(im), 6, css('--plot-2'));
      planeLabel(ctx, 'the part’s gm', P.x(re) + 9, P.y(im) + 14, css('--plot-2'), 'left', P);
      // The ends: small gm and large gm.
      const ends = d.points.filter(Boolean);
      if (ends.length > 1) {
        const [a, b] = [ends[0], ends[ends.length - 1]];
        planeLabel(ctx, 'small gm', P.x(a[0]) + 6, P.y(a[1]) - 6, muted, 'left', P);
        planeLabel(ctx, 'large gm', P.x(b[0]) + 6, P.y(b[1]) - 6, muted, 'left', P);
      }
    },
    axes: (ctx, P) => {
      ctx.save();
      ctx.fillStyle = css('--ink');
      ctx.textAlign = 'center';
      const sx = niceStep(P.x1 - P.x0);
      for (let v = Math.ceil(P.x0 / sx) * sx, n = 0; v <= P.x1 && n < 40; v += sx, n++) {
        ctx.fillRect(P.x(v) - 0.5, P.box.t + P.box.h, 1, 4);
        ctx.fillText(fmt(v, '', 3), P.x(v), P.box.t + P.box.h + 16);
      }
      ctx.textAlign = 'right';
      const sy = niceStep(P.y1 - P.y0);
      for (let v = Math.ceil(P.y0 / sy) * sy, n = 0; v <= P.y1 && n < 40; v += sy, n++) {
        ctx.fillRect(P.box.l - 4, P.y(v) - 0.5, 4, 1);
        ctx.fillText(fmt(v, '', 3), P.box.l - 6, P.y(v) + 4);
      }
      ctx.restore();
      axisLabels(ctx, P, 'Re Z_c (Ω)', 'Im Z_c (Ω)');
    },
    pick: (mx, my, P, d) => {
      const best = HR.plane.nearest(d.points, P, mx, my);
      if (best < 0) return null;
      const [re, im] = d.points[best];
      return `gm ${fmt(d.c.gm.gm_s[best], 'S', 3)} · Z_c ${fmt(re, 'Ω', 3)} ${im < 0 ? '−' : '+'} j${fmt(Math.abs(im), 'Ω', 3)}`;
    },
  });

  // The demo's crystal and oscillator sections, to add to a design without them.
  const demoSections = () => {
    const demo = JSON.parse(HR.demoText());
    return { crystal: demo.crystal, oscillator: demo.oscillator };
  };
  const hasSections = () => Boolean(HR.design.section('crystal') && HR.design.section('oscillator'));

  HR.panel({
    id: 'crystal',
    title: 'Crystal',
    mount(container) {
      // ---- Without the sections: what this is, and one button -------------------------
      const add = el('button', { type: 'button', class: 'primary', onclick: () => {
        const draft = JSON.parse(HR.design.text());
        const demo = demoSections();
        for (const name of ['crystal', 'oscillator']) if (!draft[name]) draft[name] = demo[name];
        HR.design.load(JSON.stringify(draft), 'add a crystal oscillator');
      } }, 'Add a crystal oscillator');
      const empty = card('No crystal oscillator in this design',
        el('p', {}, 'This panel uses the design’s part as the amplifier of a Pierce crystal oscillator: the part biased by a resistor from its output to its input, the crystal from its output back to its input, and a capacitor to ground at each end of the crystal.'),
        el('p', {}, 'It answers the questions asked before a board is built: will it start, and with how much margin; at what frequency it will run against the crystal’s nominal; and how hard the crystal is driven.'),
        el('p', {}, 'The button adds a 12.8 MHz crystal and its circuit, which you can then edit; Undo takes them out again.'),
        el('div', { class: 'actions' }, add));
      empty.classList.add('wide', 'crystal-empty');

      // ---- The fields --------------------------------------------------------------------
      const bound = (section, key) => {
        const { label, hint } = HR.field(section, key);
        return HR.bind(section, key, { label, hint, compact: true, origin: 'crystal' }).wrap;
      };
      const drawing = el('div', { class: 'crystal-drawing' });
      const problem = el('p', { class: 'error', 'aria-live': 'polite' });
      const inputs = card('Crystal and circuit', el('div', { class: 'crystal-layout' }, drawing,
        el('div', {},
          el('h3', {}, 'The crystal (its datasheet)'), el('div', { class: 'inputs' }, CRYSTAL.map((k) => bound('crystal', k))),
          el('p', { class: 'plot-note' }, 'Give Cm or the trim sensitivity, not both.'),
          el('h3', {}, 'The circuit around the part'), el('div', { class: 'inputs' }, CIRCUIT.map((k) => bound('oscillator', k))))), problem);
      inputs.classList.add('wide');
      const redraw = () => { if (hasSections()) drawing.replaceChildren(schematic()); };

      // ---- The figures -------------------------------------------------------------------
      const cells = {};
      const notes = {};
      const readout = el('dl', { class: 'readout roomy' }, FIGURES.map(([k, words]) => {
        cells[k] = el('span', { class: 'value' }, '—');
        notes[k] = el('span', { class: 'aside' });
        return el('div', {}, el('dt', {}, words), el('dd', { 'data-key': k }, cells[k], notes[k]));
      }));
      const warnings = el('ul', { class: 'warnings' });
      const withheld = el('p', { class: 'plot-note', hidden: true });
      const stale = el('p', { class: 'stale-note', hidden: true });
      const figures = card('Will it start, where will it run', stale, readout, warnings, withheld,
        el('p', { class: 'plot-note' }, 'Small-signal figures at the bias; the drive, current, swings and steady frequency from the large signal: the amplitude at which the circuit’s negative resistance has fallen to the ESR.'));
      figures.classList.add('wide');

      // ---- The plots ---------------------------------------------------------------------
      const row = el('div', { class: 'plots crystal-plots' });
      const plotsCard = card('Start-up, pulling and growth', el('p', { class: 'intro' },
        'Hover for values; drag to zoom, shift-drag (or the arrow keys on a focused plot) to pan, Ctrl+wheel or +/− to zoom, double-click (or 0) to reset.'), row);
      plotsCard.classList.add('wide');
      const cell = () => row.appendChild(el('div', { class: 'plot-cell' }));
      let last = null;
      const gmMarks = (u, ctx) => {
        if (!last) return;
        HR.plot.hline(u, ctx, last.rm_ohm, css('--bad'), 'ESR: starts above');
        HR.plot.hline(u, ctx, last.target_ohm, css('--plot-3'), `${fixed(last.target_ohm / last.rm_ohm, 1)} × ESR: the margin wanted`, 'left');
        HR.plot.vline(u, ctx, last.gm_own_s, css('--plot-2'), 'the part’s gm');
        if (known(last.gm_crit_s)) HR.plot.vline(u, ctx, last.gm_crit_s, css('--bad'), 'gm_crit', 1);
      };
      const gmCell = cell();
      const gmPlot = HR.plot.create(gmCell, { title: 'Negative resistance against gm', file: 'halfrail-crystal-gm', logX: true, decorate: gmMarks,
        x: { label: 'gm', unit: 'S' }, y: { label: '−Re Z_c', unit: 'Ω', range: HR.plot.including(0) },
        series: [{ label: '−Re Z_c', unit: 'Ω' }] });
      gmCell.append(el('p', { class: 'plot-note' }, 'More gm helps only up to a point: the negative resistance levels off at a ceiling the capacitors set, and past its peak falls again.'));
      const locusCell = cell();
      const plane = HR.plane.create(locusCell, locus());
      const pullMarks = (u, ctx) => {
        if (!last) return;
        if (known(last.cl_nominal_f)) HR.plot.vline(u, ctx, last.cl_nominal_f, css('--plot-3'), 'specified load');
        HR.plot.vline(u, ctx, last.cl_eff_f, css('--plot-2'), 'this circuit', 1);
        HR.plot.marker(u, ctx, last.cl_eff_f, last.pull_ppm, css('--plot-2'));
      };
      const pullCell = cell();
      const pullPlot = HR.plot.create(pullCell, { title: 'Frequency error against the load', file: 'halfrail-crystal-pull', decorate: pullMarks,
        x: { label: 'Load', unit: 'F' }, y: { label: 'Error', unit: 'ppm', range: HR.plot.including(0) },
        series: [{ label: 'Error', unit: 'ppm' }] });
      pullCell.append(el('p', { class: 'plot-note' }, 'The circuit’s own curve: C1 and C2 scaled together from a third to three times their values.'));
      const envMarks = (u, ctx) => {
        if (!last || !last.envelope) return;
        HR.plot.hline(u, ctx, last.envelope.im_steady_a, css('--plot-3'), 'steady amplitude', 'left');
      };
      const envCell = cell();
      const envPlot = HR.plot.create(envCell, { title: 'Start-up envelope of the crystal current', file: 'halfrail-crystal-startup', decorate: envMarks,
        x: { label: 'Time', unit: 's' }, y: { label: 'Im (peak)', unit: 'A' },
        series: [{ label: 'Envelope', unit: 'A' }, { label: 'exp(t/τ)', unit: 'A', opts: { dash: [5, 4], width: 1.5 } }] });
      const envNote = el('p', { class: 'plot-note' }, 'From 60 dB below the steady amplitude; the dashed curve is the small-signal growth that never slows.');
      envCell.append(envNote);

      // The figures and curves, with the pinned reference's (HR.compare) when it has them.
      const render = HR.compare.rerender(([r, c]) => {
        const [rr, rc] = [HR.compare.report('crystalReport'), HR.compare.report('crystalCurves')];
        const t = texts(r);
        for (const [k] of FIGURES) {
          const [words, value, note] = t[k];
          cells[k].textContent = words;
          notes[k].textContent = note || '';
          const dd = cells[k].parentNode;
          if (known(value)) dd.dataset.value = String(value); else delete dd.dataset.value;
        }
        cells.margin.parentNode.classList.toggle('bad', r.margin < r.margin_min);
        warnings.replaceChildren(...(r.warnings.length
          ? r.warnings.map((w) => el('li', { class: 'warning', 'data-code': w.code }, w.text))
          : [el('li', { class: 'ok' }, 'No warnings: it starts with the margin wanted, runs near its nominal frequency and drives the crystal within its rating.')]));
        withheld.hidden = !r.large_withheld;
        withheld.textContent = r.large_withheld ? `No large-signal figures: ${r.large_withheld}.` : '';
        HR.compare.figures(Object.fromEntries(FIGURES.map(([k]) => [k, cells[k].parentNode])),
          (x) => Object.fromEntries(Object.entries(texts(x)).map(([k, [words]]) => [k, words])), DIFFS, r, rr);
        last = c;
        const g = c.gm;
        gmPlot.setData([g.gm_s, g.r_neg_ohm], rc && [rc.gm.gm_s, rc.gm.r_neg_ohm]);
        plane.setData({ c, points: locusPoints(g), ref: rc ? locusPoints(rc.gm) : undefined });
        pullPlot.setData([c.pulling.cl_f, c.pulling.pull_ppm], rc && [rc.pulling.cl_f, rc.pulling.pull_ppm]);
        const e = c.envelope;
        const re = rc && rc.envelope;
        envCell.hidden = !e;
        if (e) envPlot.setData([e.t_s, e.im_a, e.im_linear_a], re && [re.t_s, re.im_a]);
        redraw();
      });

      const designCard = HR.crystalDesign.create(container);
      const spreadCard = HR.crystalSpread.create(container);
      container.append(el('h1', {}, 'Crystal'),
        el('p', { class: 'lede' }, 'The part as a Pierce crystal oscillator: whether it starts, where it runs against the crystal’s nominal frequency, and how hard it drives the crystal.'),
        el('div', { class: 'cards' }, empty, inputs, figures, designCard, plotsCard, spreadCard));
      const layout = () => {
        const has = hasSections();
        // The cards themselves: `.cards` lays out as a grid, which `hidden` on it would not undo.
        empty.hidden = has;
        for (const c of [inputs, figures, designCard, plotsCard, spreadCard]) c.hidden = !has;
        add.hidden = has || HR.design.readOnly();
        container.dataset.crystal = has ? 'present' : 'absent';
        redraw();
      };
      layout();
      HR.design.onChange(layout);
      HR.ui.onShown(container, layout);

      // The report and the curves in one worker run (the steady state takes tens of
      // milliseconds); without the sections, nothing to run.
      const box = HR.background.runBox('oscillator');
      figures.querySelector('h2').after(box.node);
      box.attach(HR.background.follow(container, {
        job: (text) => (hasSections()
          ? HR.compare.along(HR.background.calls([['crystalReport', [text]], ['crystalCurves', [text]]], { lane: 'crystal', keep: true }), [['crystalReport'], ['crystalCurves']])
          : { promise: Promise.resolve({ ok: null }), cancel() {} }),
        delay: 0, quiet: HR.background.QUIET,
        render: (ok) => { layout(); if (ok) render(ok); },
        // A field that shows its own error leaves nothing more to say here.
        report: (error, field) => { problem.textContent = field ? '' : HR.words(error); },
        progress: box.progress,
        stale: box.stale(HR.background.staleMarker(stale, [readout, row])),
      }));
    },
  });
})();
