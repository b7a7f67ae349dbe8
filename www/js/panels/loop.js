'use strict';
// Loop: whether the stage's feedback loop settles, rings or oscillates. The loop gain
// T (Bode's return ratio of stage 1) with its crossover and margins, the Nyquist plot
// of T, the closed-loop poles, the step response and μ, a verdict in plain words, and
// the one-component changes that buy the wanted phase margin (applied as undoable
// edits). Every figure comes from the core's loopReport; this file lays them out.

(() => {
  const { el, card } = HR.ui;
  const fmt = HR.fmt;
  const { known, fixed } = HR;
  const deg = (v, decimals = 1) => (known(v) ? `${fixed(v, decimals)}°` : '—');
  const hz = (v, digits = 3) => (known(v) ? fmt(v, 'Hz', digits) : '—');
  const about = (v) => hz(v, 2);
  const css = (name) => HR.plot.css(name);

  // The index of the sweep point nearest `f` (for a marker on a curve), or -1.
  const nearestIndex = (fs, f) => {
    if (!known(f)) return -1;
    let best = -1;
    fs.forEach((x, i) => { if (best < 0 || Math.abs(Math.log(x / f)) < Math.abs(Math.log(fs[best] / f))) best = i; });
    return best;
  };

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

  const KNOBS = { c_fb_f: ['F', 'C', 'C fb'], r_out_ohm: ['Ω', 'R', 'R out'], r_fb_ohm: ['Ω', 'R', 'R fb'] };

  // A standard value as the Stage panel shows it (RKM code for a resistor, engineering
  // notation for a capacitor, with the coarsest E-series it belongs to), and the text
  // to put in the design: the RKM code when it reads back as exactly the value.
  const valueOf = (key, v) => {
    const [unit, kind] = KNOBS[key] || ['', 'R'];
    const rkm = HR.rkm(v, kind);
    const shown = unit === 'Ω' ? rkm || fmt(v, unit, 3) : fmt(v, unit, 3);
    const look = HR.call('lookUp', String(v));
    const series = look.ok && look.ok.member_of.length ? ` · ${look.ok.member_of[0]}` : '';
    const back = rkm ? HR.call('parseValue', rkm, unit, `stage.${key}`) : { error: true };
    return { shown: `${shown}${series}`, text: back.ok && back.ok.value === v ? rkm : v };
  };

  const capitalised = (t) => t.charAt(0).toUpperCase() + t.slice(1);
  const change = (before, after) => `${before} → ${after}`;

  // ---- A figure in the complex plane -------------------------------------------
  // uPlot draws curves of one sorted x; the Nyquist plot and the pole map are curves
  // and points in the plane, so they get their own canvas, with the same manners as
  // the other plots: a hover read-out, Ctrl/Alt+wheel or +/− to zoom, the arrow keys
  // to pan, double-click or 0 to reset, PNG export.
  // Each new result resets the view to `home`, as a new result resets uPlot's ranges.
  //   spec: {title, file, height, square, home(data) → [x0, x1, y0, y1],
  //          draw(ctx, P, data), pick(mx, my, P, data) → text or null,
  //          idle(data) → the read-out when nothing is under the cursor, extra: [buttons]}
  const plane = (container, spec) => {
    const canvas = el('canvas', { role: 'img', 'aria-label': spec.title });
    const readout = el('p', { class: 'plane-readout' }, '\u00a0');
    const png = el('button', { type: 'button', class: 'small', 'aria-label': `Save “${spec.title}” as PNG`,
      onclick: () => canvas.toBlob((blob) => HR.ui.download(`${spec.file}.png`, blob)) }, 'PNG');
    const wrap = el('figure', { class: 'plot plane', tabindex: 0, 'aria-label': `${spec.title}. Arrow keys pan, + and − zoom, 0 resets.` },
      el('figcaption', {}, spec.title, ' ', ...(spec.extra || []), png), canvas, readout);
    container.append(wrap);
    const M = { l: 58, r: 14, t: 10, b: 42 };
    let data = null;
    let view = null;
    let P = null;
    const idle = () => { readout.textContent = data ? spec.idle(data) : '\u00a0'; };

    // The view fitted to the box; with `square`, one scale on both axes.
    const layout = () => {
      const w = Math.max(300, wrap.clientWidth || 480);
      const h = spec.height || 300;
      const box = { l: M.l, t: M.t, w: w - M.l - M.r, h: h - M.t - M.b };
      let [x0, x1, y0, y1] = view;
      if (spec.square) {
        const s = Math.min(box.w / (x1 - x0), box.h / (y1 - y0));
        const cx = (x0 + x1) / 2;
        const cy = (y0 + y1) / 2;
        [x0, x1, y0, y1] = [cx - box.w / s / 2, cx + box.w / s / 2, cy - box.h / s / 2, cy + box.h / s / 2];
      }
      return {
        w, h, box, x0, x1, y0, y1,
        x: (u) => box.l + ((u - x0) / (x1 - x0)) * box.w,
        y: (v) => box.t + ((y1 - v) / (y1 - y0)) * box.h,
        ux: (px) => x0 + ((px - box.l) / box.w) * (x1 - x0),
        uy: (py) => y1 - ((py - box.t) / box.h) * (y1 - y0),
      };
    };

    const draw = () => {
      if (!data) return;
      P = layout();
      const dpr = window.devicePixelRatio || 1;
      canvas.width = Math.round(P.w * dpr);
      canvas.height = Math.round(P.h * dpr);
      canvas.style.width = `${P.w}px`;
      canvas.style.height = `${P.h}px`;
      const ctx = canvas.getContext('2d');
      ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
      ctx.fillStyle = css('--surface');
      ctx.fillRect(0, 0, P.w, P.h);
      ctx.font = '12px sans-serif';
      ctx.save();
      ctx.beginPath();
      ctx.rect(P.box.l, P.box.t, P.box.w, P.box.h);
      ctx.clip();
      spec.draw(ctx, P, data);
      ctx.restore();
      ctx.strokeStyle = css('--line');
      ctx.lineWidth = 1;
      ctx.strokeRect(P.box.l + 0.5, P.box.t + 0.5, P.box.w, P.box.h);
      if (spec.axes) spec.axes(ctx, P, data);
    };

    const setView = (v) => { view = v; draw(); };
    const reset = () => { if (data) setView(spec.home(data)); };
    const current = () => [P.x0, P.x1, P.y0, P.y1];
    const zoom = (factor, cx, cy) => {
      const [x0, x1, y0, y1] = current();
      setView([cx - (cx - x0) * factor, cx + (x1 - cx) * factor, cy - (cy - y0) * factor, cy + (y1 - cy) * factor]);
    };
    const pan = (fx, fy) => {
      const [x0, x1, y0, y1] = current();
      const dx = (x1 - x0) * fx;
      const dy = (y1 - y0) * fy;
      setView([x0 + dx, x1 + dx, y0 + dy, y1 + dy]);
    };
    const local = (e) => { const b = canvas.getBoundingClientRect(); return [e.clientX - b.left, e.clientY - b.top]; };

    canvas.addEventListener('mousemove', (e) => {
      if (!P) return;
      const text = spec.pick(...local(e), P, data);
      if (text) readout.textContent = text; else idle();
    });
    canvas.addEventListener('mouseleave', idle);
    canvas.addEventListener('dblclick', reset);
    wrap.addEventListener('wheel', (e) => {
      if (!P || (!e.ctrlKey && !e.altKey)) return; // plain scrolling scrolls the page
      e.preventDefault();
      const [mx, my] = local(e);
      zoom(e.deltaY > 0 ? 1.25 : 0.8, P.ux(mx), P.uy(my));
    }, { passive: false });
    wrap.addEventListener('keydown', (e) => {
      if (!P || e.target !== wrap) return;
      const cx = (P.x0 + P.x1) / 2;
      const cy = (P.y0 + P.y1) / 2;
      const keys = { ArrowLeft: () => pan(-0.1, 0), ArrowRight: () => pan(0.1, 0), ArrowUp: () => pan(0, 0.1), ArrowDown: () => pan(0, -0.1),
        '+': () => zoom(0.8, cx, cy), '=': () => zoom(0.8, cx, cy), '-': () => zoom(1.25, cx, cy), 0: reset };
      if (keys[e.key]) { keys[e.key](); e.preventDefault(); }
    });
    let width = 0;
    new ResizeObserver(() => { if (wrap.clientWidth !== width) { width = wrap.clientWidth; draw(); } }).observe(wrap);
    return {
      node: wrap,
      setData(d) {
        data = d;
        wrap.dataset.reference = d.ref ? String(d.ref.length) : '';
        view = spec.home(d);
        draw();
        idle();
      },
      setView,
      reset,
    };
  };

  // Draws text with a halo of the surface colour, so it reads over grid and curves;
  // with `P`, moved sideways to stay inside the plot box.
  const label = (ctx, text, x, y, colour, align = 'left', P = null) => {
    ctx.save();
    if (P) {
      const w = ctx.measureText(text).width;
      const left = align === 'right' ? x - w : x;
      x += Math.max(P.box.l + 3 - left, Math.min(0, P.box.l + P.box.w - 3 - (left + w)));
    }
    ctx.textAlign = align;
    ctx.lineWidth = 3;
    ctx.strokeStyle = css('--surface');
    ctx.strokeText(text, x, y);
    ctx.fillStyle = colour;
    ctx.fillText(text, x, y);
    ctx.restore();
  };

  const cross = (ctx, x, y, size, colour, width = 2) => {
    ctx.save();
    ctx.strokeStyle = colour;
    ctx.lineWidth = width;
    ctx.beginPath();
    ctx.moveTo(x - size, y - size); ctx.lineTo(x + size, y + size);
    ctx.moveTo(x - size, y + size); ctx.lineTo(x + size, y - size);
    ctx.stroke();
    ctx.restore();
  };

  const ring = (ctx, x, y, radius, colour) => {
    ctx.save();
    ctx.strokeStyle = colour;
    ctx.lineWidth = 2;
    ctx.beginPath();
    ctx.arc(x, y, radius, 0, 2 * Math.PI);
    ctx.stroke();
    ctx.restore();
  };

  // Axis labels of a plane: x under the box, y turned along its left side.
  const axisLabels = (ctx, P, xText, yText) => {
    ctx.save();
    ctx.fillStyle = css('--ink');
    ctx.textAlign = 'center';
    ctx.fillText(xText, P.box.l + P.box.w / 2, P.h - 6);
    ctx.translate(14, P.box.t + P.box.h / 2);
    ctx.rotate(-Math.PI / 2);
    ctx.fillText(yText, 0, 0);
    ctx.restore();
  };

  // ---- Nyquist: T with its radius log-compressed --------------------------------
  // r' = log10(1 + |T|) / log10(2) = log2(1 + |T|): |T| = 1 stays on the unit circle,
  // angles are true, and the map is one-to-one, so encirclements of −1 are kept.
  const compress = (m) => Math.log2(1 + m);
  const RINGS = [1, 10, 100, 1000, 1e4, 1e5, 1e6];
  const AXIS_TICKS = [0.5, 1, 2, 5, 10, 30, 100, 300, 1000, 3000, 1e4, 1e5, 1e6];
  const tickOf = (m) => (Math.abs(m) < 1 ? String(m) : fmt(m, '', 1));

  const nyquistPoints = (r) => r.t_re.map((re, i) => {
    const im = r.t_im[i];
    if (!known(re) || !known(im)) return null;
    const m = Math.hypot(re, im);
    const k = m > 0 ? compress(m) / m : 0;
    return [re * k, im * k];
  });

  const nyquistSpec = (state) => ({
    title: 'Nyquist plot of the loop gain T',
    file: 'halfrail-nyquist',
    height: 320,
    square: true,
    idle: () => 'Hover the curve for f, |T| and ∠T.',
    home: (d) => {
      let [x0, x1, y0, y1] = [-1.2, 1.2, -1.2, 1.2];
      for (const p of [...d.points, ...(d.ref || [])]) {
        if (!p) continue;
        x0 = Math.min(x0, p[0]); x1 = Math.max(x1, p[0]);
        y0 = Math.min(y0, p[1], -p[1]); y1 = Math.max(y1, p[1], -p[1]);
      }
      const pad = 0.06 * Math.max(x1 - x0, y1 - y0);
      return [x0 - pad, x1 + pad, y0 - pad, y1 + pad];
    },
    draw: (ctx, P, d) => {
      const line = css('--line');
      const muted = css('--muted');
      // Rings of equal |T|; the unit circle drawn strongest.
      for (const m of RINGS) {
        const rad = (compress(m) * P.box.w) / (P.x1 - P.x0);
        ctx.save();
        ctx.strokeStyle = m === 1 ? css('--ink') : line;
        ctx.lineWidth = m === 1 ? 1.5 : 1;
        if (m !== 1) ctx.setLineDash([4, 4]);
        ctx.beginPath();
        ctx.arc(P.x(0), P.y(0), rad, 0, 2 * Math.PI);
        ctx.stroke();
        ctx.restore();
        // Labelled at 45°, when the label fits in the box.
        const text = m === 1 ? '|T| = 1' : `|T| = ${fmt(m, '', 1)}`;
        const [lx, ly] = [P.x(compress(m) * Math.SQRT1_2) + 3, P.y(compress(m) * Math.SQRT1_2) - 3];
        if (lx + ctx.measureText(text).width < P.box.l + P.box.w - 2 && ly > P.box.t + 12 && lx > P.box.l) label(ctx, text, lx, ly, muted);
      }
      // The axes through 0.
      ctx.save();
      ctx.strokeStyle = muted;
      ctx.lineWidth = 1;
      ctx.beginPath();
      ctx.moveTo(P.box.l, P.y(0)); ctx.lineTo(P.box.l + P.box.w, P.y(0));
      ctx.moveTo(P.x(0), P.box.t); ctx.lineTo(P.x(0), P.box.t + P.box.h);
      ctx.stroke();
      ctx.restore();
      // Negative frequencies (the mirror image), then the sweep itself.
      const path = (sign, colour, dash, width, points = d.points) => {
        ctx.save();
        ctx.strokeStyle = colour;
        ctx.lineWidth = width;
        ctx.setLineDash(dash);
        ctx.beginPath();
        let pen = false;
        for (const p of points) {
          if (!p) { pen = false; continue; }
          const [x, y] = [P.x(p[0]), P.y(sign * p[1])];
          if (pen) ctx.lineTo(x, y); else ctx.moveTo(x, y);
          pen = true;
        }
        ctx.stroke();
        ctx.restore();
      };
      // The reference's T (positive frequencies), under this design's.
      if (d.ref) {
        path(1, muted, [6, 4], 1.5, d.ref);
        label(ctx, '- - reference', P.box.l + 6, P.box.t + 16, muted);
      }
      path(-1, css('--plot-3'), [5, 4], 1.5);
      path(1, css('--plot-1'), [], 2);
      // Arrowheads where the frequency passes each decade: the way the sweep runs.
      const fs = d.r.f_hz;
      ctx.save();
      ctx.fillStyle = css('--plot-1');
      for (let i = 1; i < fs.length - 1; i++) {
        if (Math.floor(Math.log10(fs[i - 1]) + 1e-9) === Math.floor(Math.log10(fs[i]) + 1e-9)) continue;
        const [a, b] = [d.points[i], d.points[i + 1]];
        if (!a || !b) continue;
        const [ax, ay, bx, by] = [P.x(a[0]), P.y(a[1]), P.x(b[0]), P.y(b[1])];
        const len = Math.hypot(bx - ax, by - ay);
        if (len < 0.5) continue;
        const [ux, uy] = [(bx - ax) / len, (by - ay) / len];
        ctx.beginPath();
        ctx.moveTo(ax + ux * 7, ay + uy * 7);
        ctx.lineTo(ax - ux * 4 - uy * 4.5, ay - uy * 4 + ux * 4.5);
        ctx.lineTo(ax - ux * 4 + uy * 4.5, ay - uy * 4 - ux * 4.5);
        ctx.closePath();
        ctx.fill();
      }
      ctx.restore();
      // f_design and the crossover on the curve; the −1 point.
      const s = d.r.summary;
      const mark = (f, text, colour) => {
        const i = nearestIndex(fs, f);
        const p = i >= 0 ? d.points[i] : null;
        if (!p) return;
        ring(ctx, P.x(p[0]), P.y(p[1]), 5, colour);
        label(ctx, text, P.x(p[0]) + 8, P.y(p[1]) + 14, colour, 'left', P);
      };
      mark(d.r.f_design_hz, 'f_design', css('--plot-2'));
      mark(s.crossover_hz, 'crossover', css('--plot-4'));
      cross(ctx, P.x(-1), P.y(0), 5, css('--bad'), 2.5);
      label(ctx, '−1', P.x(-1) - 8, P.y(0) - 8, css('--bad'), 'right');
    },
    axes: (ctx, P) => {
      // Ticks on the real axis read as Re T there (where Im T = 0).
      ctx.save();
      ctx.fillStyle = css('--ink');
      ctx.textAlign = 'center';
      // 0 and ±1 first, then the decades, then the rest, wherever they do not crowd.
      const order = [1, 10, 100, 1000, 1e4, 1e5, 1e6, ...AXIS_TICKS];
      const placed = [];
      for (const [u, text] of [[0, '0'], ...order.flatMap((m) => [[compress(m), tickOf(m)], [-compress(m), tickOf(-m)]])]) {
        const x = P.x(u);
        if (x < P.box.l || x > P.box.l + P.box.w || placed.some((q) => Math.abs(q - x) < 30)) continue;
        placed.push(x);
        ctx.fillRect(x - 0.5, P.box.t + P.box.h, 1, 4);
        // and a tick on the real axis itself, where the value holds
        const y0 = P.y(0);
        if (y0 > P.box.t && y0 < P.box.t + P.box.h) ctx.fillRect(x - 0.5, y0 - 3, 1, 6);
        ctx.fillText(text, x, P.box.t + P.box.h + 16);
      }
      ctx.restore();
      axisLabels(ctx, P, 'Re T (radius drawn as log₂(1 + |T|))', 'Im T');
    },
    pick: (mx, my, P, d) => {
      let best = -1;
      let bestD = 12;
      d.points.forEach((p, i) => {
        if (!p) return;
        const dist = Math.hypot(P.x(p[0]) - mx, P.y(p[1]) - my);
        if (dist < bestD) { bestD = dist; best = i; }
      });
      if (best < 0) return null;
      const r = d.r;
      return `f ${hz(r.f_hz[best], 4)} · |T| ${known(r.t_db[best]) ? fmt(r.t_db[best], 'dB') : '—'} · ∠T ${deg(r.t_phase_deg[best])}`;
    },
    extra: [el('button', { type: 'button', class: 'small', onclick: () => state.nyquist && state.nyquist.setView([-3, 1, -2, 2]) }, 'Near −1')],
  });

  // ---- Pole map: both axes logarithmic on each side of zero ----------------------
  // u = sign(v)·log10(1 + |v|/L): linear within ±L, a decade per unit beyond.
  const symlog = (L) => ({
    fwd: (v) => Math.sign(v) * Math.log10(1 + Math.abs(v) / L),
    inv: (u) => Math.sign(u) * L * (10 ** Math.abs(u) - 1),
  });

  const poleScale = (poles) => {
    const all = poles.flat().map(Math.abs).filter(known);
    const big = Math.max(10, ...all);
    // Parts far below the largest are rounding, not a scale to show.
    const parts = all.filter((v) => v > big * 1e-9);
    const small = parts.length ? Math.min(...parts) : 1;
    const L = 10 ** Math.floor(Math.log10(small));
    return { L, top: 10 ** Math.ceil(Math.log10(big) + 1e-9), ...symlog(L) };
  };

  const poleSpec = () => ({
    title: 'Closed-loop poles (natural frequencies)',
    file: 'halfrail-poles',
    height: 320,
    idle: (d) => {
      const p = d.r.summary.least_damped;
      return p ? `Ringed: the least-damped pair, ζ ${fixed(p.zeta, 3)}, Q ${fixed(p.q, 2)}. Hover a pole for its value.` : 'Hover a pole for its value.';
    },
    home: (d) => {
      const u = d.scale.fwd(d.scale.top) * 1.04;
      return [-u, u, -u, u];
    },
    draw: (ctx, P, d) => {
      const sc = d.scale;
      // The right half-plane: natural frequencies there grow.
      ctx.save();
      ctx.fillStyle = css('--bad-bg');
      ctx.fillRect(P.x(0), P.box.t, P.box.l + P.box.w - P.x(0), P.box.h);
      ctx.restore();
      const bottom = P.box.t + P.box.h - 6;
      label(ctx, 'right half-plane: grows', Math.max(P.x(0), P.box.l) + 6, bottom, css('--bad'));
      label(ctx, 'left: decays', Math.min(P.x(0), P.box.l + P.box.w) - 6, bottom, css('--muted'), 'right');
      // Grid at 0 and every decade either side.
      ctx.save();
      ctx.strokeStyle = css('--line');
      ctx.lineWidth = 1;
      for (const t of d.ticks) {
        ctx.beginPath();
        ctx.moveTo(P.x(t), P.box.t); ctx.lineTo(P.x(t), P.box.t + P.box.h);
        ctx.moveTo(P.box.l, P.y(t)); ctx.lineTo(P.box.l + P.box.w, P.y(t));
        ctx.stroke();
      }
      ctx.strokeStyle = css('--muted');
      ctx.beginPath();
      ctx.moveTo(P.x(0), P.box.t); ctx.lineTo(P.x(0), P.box.t + P.box.h);
      ctx.moveTo(P.box.l, P.y(0)); ctx.lineTo(P.box.l + P.box.w, P.y(0));
      ctx.stroke();
      ctx.restore();
      // The reference's poles, small and muted, under this design's.
      for (const [re, im] of d.ref || []) cross(ctx, P.x(sc.fwd(re)), P.y(sc.fwd(im)), 4, css('--muted'), 1.5);
      if (d.ref) label(ctx, 'small ×: reference', P.box.l + 6, P.box.t + 16, css('--muted'));
      for (const [re, im] of d.poles) {
        cross(ctx, P.x(sc.fwd(re)), P.y(sc.fwd(im)), 5, re > 0 ? css('--bad') : css('--plot-1'), 2.5);
      }
      // The least-damped pair, as the core names it, ringed (its damping is in the read-out).
      const p = d.r.summary.least_damped;
      if (p) {
        const [re, im] = p.pole_hz;
        for (const sign of [1, -1]) ring(ctx, P.x(sc.fwd(re)), P.y(sc.fwd(sign * im)), 9, css('--plot-2'));
      }
    },
    axes: (ctx, P, d) => {
      const sc = d.scale;
      ctx.save();
      ctx.fillStyle = css('--ink');
      const tickText = (t) => (t === 0 ? '0' : fmt(sc.inv(t), '', 1));
      ctx.textAlign = 'center';
      let last = -Infinity;
      for (const t of d.ticks) {
        const x = P.x(t);
        if (x < P.box.l - 1 || x > P.box.l + P.box.w + 1) continue;
        ctx.fillRect(x - 0.5, P.box.t + P.box.h, 1, 4);
        if (x - last < 34) continue;
        last = x;
        ctx.fillText(tickText(t), x, P.box.t + P.box.h + 16);
      }
      ctx.textAlign = 'right';
      last = Infinity;
      for (const t of d.ticks) {
        const y = P.y(t);
        if (y < P.box.t - 1 || y > P.box.t + P.box.h + 1) continue;
        ctx.fillRect(P.box.l - 4, y - 0.5, 4, 1);
        if (last - y < 16) continue;
        last = y;
        ctx.fillText(tickText(t), P.box.l - 6, y + 4);
      }
      ctx.restore();
      axisLabels(ctx, P, 'Re s/2π (Hz, symmetric log)', 'Im s/2π (Hz, symmetric log)');
    },
    pick: (mx, my, P, d) => {
      let best = null;
      let bestD = 12;
      for (const q of d.poles) {
        const dist = Math.hypot(P.x(d.scale.fwd(q[0])) - mx, P.y(d.scale.fwd(q[1])) - my);
        if (dist < bestD) { bestD = dist; best = q; }
      }
      if (!best) return null;
      return `pole ${hz(best[0])} ${best[1] < 0 ? '−' : '+'} j${hz(Math.abs(best[1]))} (${best[0] > 0 ? 'grows' : 'decays'})`;
    },
  });

  const poleTicks = (sc) => {
    const ticks = [0];
    for (let v = sc.L; v <= sc.top * 1.0001; v *= 10) ticks.push(sc.fwd(v), sc.fwd(-v));
    return ticks.sort((a, b) => a - b);
  };

  // ---- Bode-plot annotations (uPlot decorations) -----------------------------------

  // A vertical span from y0 to y1 at x, with an arrowhead at y1 and a label: a margin.
  const span = (u, ctx, x, y0, y1, colour, text) => {
    if (!known(x) || x < u.scales.x.min || x > u.scales.x.max) return;
    const dpr = devicePixelRatio;
    const px = u.valToPos(x, 'x', true);
    const [p0, p1] = [u.valToPos(y0, 'y', true), u.valToPos(y1, 'y', true)];
    ctx.save();
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
    ctx.lineWidth = 3 * dpr;
    ctx.strokeStyle = css('--surface');
    const ty = Math.min(Math.max((p0 + p1) / 2 + 4 * dpr, u.bbox.top + 40 * dpr), u.bbox.top + u.bbox.height - 6 * dpr);
    ctx.strokeText(text, px + (right ? 7 : -7) * dpr, ty);
    ctx.fillText(text, px + (right ? 7 : -7) * dpr, ty);
    ctx.restore();
  };

  // A y range that takes in the data and the given levels, padded as uPlot pads.
  const including = (...levels) => (u, lo, hi) => {
    const all = [lo, hi, ...levels].filter(known);
    if (!all.length) return [0, 1];
    const [a, b] = [Math.min(...all), Math.max(...all)];
    return uPlot.rangeNum(a, b === a ? a + 1 : b, 0.1, true);
  };

  HR.panel({
    id: 'loop',
    title: 'Loop',
    mount(container) {
      const state = { nyquist: null };
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
      state.nyquist = plane(nyqCell, nyquistSpec(state));
      note(nyqCell, 'T over the sweep (solid, an arrow at each decade; dashed: negative frequencies). Radius drawn as log₂(1 + |T|): |T| = 1 stays the unit circle, angles are true, ticks give T on the real axis. Encircling −1 means growing closed-loop poles, when the broken loop has none.');
      const poleCell = cell();
      const polePlot = plane(poleCell, poleSpec());
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
        helperWrap.hidden = r.suggestions.length === 0;
        if (!r.suggestions.length) {
          helperIntro.textContent = `${r.helper_words} The margin asked for is the target’s pm_min_deg, or 60° when the target sets none.`;
          helperBody.replaceChildren();
          return;
        }
        helperIntro.textContent = `The loop has ${known(s.phase_margin_deg) ? deg(s.phase_margin_deg) : 'no measurable'} phase margin; ${wanted} is wanted (the target’s pm_min_deg, or 60° when it sets none). ${r.helper_words} Apply puts the values into the stage; Undo (in the Design bar, or Ctrl+Z) takes them back.`;
        const pmNow = known(s.phase_margin_deg) ? deg(s.phase_margin_deg) : (s.stable ? 'no crossover' : 'unstable');
        helperBody.replaceChildren(...r.suggestions.map((g) => {
          const found = g.changes.length > 0;
          // Each change of the suggestion (two for a pair), shown and as the text to set.
          const vs = g.changes.map((c) => ({ key: c.key, ...valueOf(c.key, c.value) }));
          const shown = vs.map((v) => (vs.length > 1 ? `${(KNOBS[v.key] || [])[2] || v.key} ${v.shown}` : v.shown)).join(' + ');
          const label = vs.map((v) => `${(KNOBS[v.key] || [])[2] || v.key} = ${v.shown}`).join(', ');
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
        state.nyquist.setData({ r, points: nyquistPoints(r), ref: ref && nyquistPoints(ref) });
        const refPoles = ref && ref.summary.poles_hz;
        const scale = poleScale([...s.poles_hz, ...(refPoles || [])]);
        polePlot.setData({ r, poles: s.poles_hz, ref: refPoles, scale, ticks: poleTicks(scale) });
        poleNote.textContent = `The closed loop’s natural frequencies s/2π (×). In the shaded right half-plane they grow; the further left, the faster they decay. Both axes are logarithmic either side of 0, linear within ±${fmt(scale.L, 'Hz', 1)}.`;
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
      HR.design.follow(container, {
        compute: (text) => HR.call('loopReport', text),
        render,
        report: (error) => {
          problem.textContent = error ? error.message || error.reason : '';
          problem.hidden = !error;
        },
        stale: (isStale, rendered) => {
          stale.hidden = !(isStale && rendered);
          for (const node of [verdictBox, readout, helperWrap]) node.classList.toggle('stale', isStale);
        },
      });
    },
  });
})();
