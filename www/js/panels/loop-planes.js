'use strict';
// The Loop panel's two figures in the complex plane, as renderers on HR.plane: the
// Nyquist plot of the loop gain T (radius log-compressed, an arrow at each decade,
// f_design, the crossover and −1 marked) and the map of the closed-loop poles (both
// axes symmetric-log, the right half-plane shaded, the core's least-damped pair
// ringed). nyquistData and poleData put a report (and the reference's) in the form
// they draw; nothing here is physics, only where on the canvas it goes.

HR.loopPlanes = (() => {
  const { el } = HR.ui;
  const fmt = HR.fmt;
  const { known, fixed } = HR;
  const { label, cross, ring, axisLabels } = HR.plane;
  const deg = (v, decimals = 1) => (known(v) ? `${fixed(v, decimals)}°` : '—');
  const hz = (v, digits = 3) => (known(v) ? fmt(v, 'Hz', digits) : '—');
  const css = (name) => HR.plot.css(name);

  // The index of the sweep point nearest `f` (for a marker on a curve), or -1.
  const nearestIndex = (fs, f) => {
    if (!known(f)) return -1;
    let best = -1;
    fs.forEach((x, i) => { if (best < 0 || Math.abs(Math.log(x / f)) < Math.abs(Math.log(fs[best] / f))) best = i; });
    return best;
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

  const nyquist = () => ({
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
      // The reference's T (positive frequencies), under this design's.
      if (d.ref) {
        HR.plane.polyline(ctx, P, d.ref, { colour: muted, width: 1.5, dash: [6, 4] });
        label(ctx, '- - reference', P.box.l + 6, P.box.t + 16, muted);
      }
      // Negative frequencies (the mirror image), then the sweep itself.
      HR.plane.polyline(ctx, P, d.points, { colour: css('--plot-3'), width: 1.5, dash: [5, 4], sign: -1 });
      HR.plane.polyline(ctx, P, d.points, { colour: css('--plot-1'), width: 2 });
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
      const best = HR.plane.nearest(d.points, P, mx, my);
      if (best < 0) return null;
      const r = d.r;
      return `f ${hz(r.f_hz[best], 4)} · |T| ${known(r.t_db[best]) ? fmt(r.t_db[best], 'dB') : '—'} · ∠T ${deg(r.t_phase_deg[best])}`;
    },
    extra: (figure) => [el('button', { type: 'button', class: 'small', onclick: () => figure.setView([-3, 1, -2, 2]) }, 'Near −1')],
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

  const poles = () => ({
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

  // What the Nyquist plot draws: the report `r`, its T compressed, the reference's.
  const nyquistData = (r, ref) => ({ r, points: nyquistPoints(r), ref: ref && nyquistPoints(ref) });

  // What the pole map draws: the report's poles and the reference's (or null), on one
  // scale that takes in both.
  const poleData = (r, ref) => {
    const refPoles = ref && ref.summary.poles_hz;
    const scale = poleScale([...r.summary.poles_hz, ...(refPoles || [])]);
    return { r, poles: r.summary.poles_hz, ref: refPoles, scale, ticks: poleTicks(scale) };
  };

  return { nyquist, nyquistData, poles, poleData };
})();
