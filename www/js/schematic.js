'use strict';
// The stage's schematic on a canvas, drawn from its actual topology (SPEC §3.2):
// fitted components are drawn with their values, a series part that is not fitted
// is a plain wire, a shunt that is not fitted is left out. Returns where each
// component's label sits so the panel can put an editing control there.

HR.schematic = (() => {
  // Grid positions (in units of `U` pixels) of the nodes along the signal path. `U` is
  // GRID CSS px at full size, less when the drawing is scaled to a narrow window.
  const GRID = 20;
  let U = GRID;
  const MAIN_Y = 8;
  const FEEDBACK_Y = 3.6;
  const X = { src: 2, in: 7, cin: 12, rin: 17, g1: 21, amp: 24.5, o: 28, rout: 33, cout: 38, out: 41, load: 50 };

  const line = (ctx, x1, y1, x2, y2) => {
    ctx.beginPath();
    ctx.moveTo(x1 * U, y1 * U);
    ctx.lineTo(x2 * U, y2 * U);
    ctx.stroke();
  };
  const dot = (ctx, x, y) => { ctx.beginPath(); ctx.arc(x * U, y * U, 3, 0, 2 * Math.PI); ctx.fill(); };
  const ground = (ctx, x, y) => {
    line(ctx, x, y, x, y + 0.6);
    for (const [w, dy] of [[0.6, 0.6], [0.4, 0.8], [0.2, 1.0]]) line(ctx, x - w, y + dy, x + w, y + dy);
  };

  // A resistor (zig-zag) or capacitor (two plates) between two points, horizontal or vertical.
  const part = (ctx, kind, x1, y1, x2, y2) => {
    const horizontal = y1 === y2;
    const [a, b] = horizontal ? [x1, x2] : [y1, y2];
    const mid = (a + b) / 2;
    const half = kind === 'R' ? 0.9 : 0.18;
    const at = (t, off = 0) => (horizontal ? [t, y1 + off] : [x1 + off, t]);
    line(ctx, ...at(a), ...at(mid - half));
    line(ctx, ...at(mid + half), ...at(b));
    if (kind === 'R') {
      ctx.beginPath();
      for (let i = 0; i <= 6; i++) {
        const [px, py] = at(mid - half + (2 * half * i) / 6, i === 0 || i === 6 ? 0 : (i % 2 ? -0.35 : 0.35));
        if (i === 0) ctx.moveTo(px * U, py * U); else ctx.lineTo(px * U, py * U);
      }
      ctx.stroke();
    } else {
      for (const s of [-half, half]) line(ctx, ...at(mid + s, -0.5), ...at(mid + s, 0.5));
    }
  };

  // The drawing's size at full scale (CSS px).
  const WIDTH = 52 * GRID;
  const HEIGHT = 14 * GRID;

  // draw(canvas, label(key) → {text, short} or null, stages, ratio, scale) → [{key, x, y, text}] label
  // anchors (CSS px). A fitted series part marked `short` (0 Ω) is drawn as a wire.
  // `ratio`: canvas pixels a CSS pixel (the screen's by default; more for paper).
  // `scale`: the drawing's size against WIDTH × HEIGHT (1 by default), so that it fits
  // a narrow window; the labels put at the anchors are to be scaled alike.
  const draw = (canvas, describe, stages, ratio = window.devicePixelRatio || 1, scale = 1) => {
    const label = (key) => { const d = describe(key); return d && !d.short ? d.text : null; };
    const text = (key) => { const d = describe(key); return d ? d.text : null; };
    U = GRID * scale;
    const width = 52 * U;
    const height = 14 * U;
    // A canvas given its size again is made afresh (a new bitmap): only when it changes.
    if (canvas.width !== width * ratio || canvas.height !== height * ratio) {
      canvas.width = width * ratio;
      canvas.height = height * ratio;
      canvas.style.width = `${width}px`;
      canvas.style.height = `${height}px`;
    }
    const ctx = canvas.getContext('2d');
    ctx.setTransform(ratio, 0, 0, ratio, 0, 0);
    ctx.clearRect(0, 0, width, height);
    const ink = HR.plot.css('--ink');
    ctx.strokeStyle = ink;
    ctx.fillStyle = ink;
    ctx.lineWidth = Math.max(1, 1.6 * scale);
    ctx.textAlign = 'start'; // the rest of the state the last draw left is set where used
    const anchors = [];
    const anchor = (key, x, y) => anchors.push({ key, x: x * U, y: y * U, text: text(key) });
    const series = (key, kind, from, to) => {
      if (label(key)) part(ctx, kind, X[from], MAIN_Y, X[to], MAIN_Y);
      else line(ctx, X[from], MAIN_Y, X[to], MAIN_Y);
      anchor(key, (X[from] + X[to]) / 2, MAIN_Y - 1.6);
    };
    const shunt = (key, kind, at, dx = 0) => {
      if (label(key)) {
        line(ctx, X[at], MAIN_Y, X[at] + dx, MAIN_Y);
        part(ctx, kind, X[at] + dx, MAIN_Y, X[at] + dx, MAIN_Y + 3);
        ground(ctx, X[at] + dx, MAIN_Y + 3);
      }
      anchor(key, X[at] + dx, MAIN_Y + 4.9);
    };

    // The source: an EMF in a circle, its resistance in series.
    ctx.beginPath();
    ctx.arc(X.src * U, (MAIN_Y + 1.5) * U, 0.8 * U, 0, 2 * Math.PI);
    ctx.stroke();
    ctx.font = `${13 * scale}px sans-serif`;
    ctx.fillText('~', (X.src - 0.25) * U, (MAIN_Y + 1.65) * U);
    line(ctx, X.src, MAIN_Y + 0.7, X.src, MAIN_Y);
    ground(ctx, X.src, MAIN_Y + 2.3);
    line(ctx, X.src, MAIN_Y, X.src + 0.5, MAIN_Y);
    if (label('source_ohm')) part(ctx, 'R', X.src + 0.5, MAIN_Y, X.in, MAIN_Y); else line(ctx, X.src + 0.5, MAIN_Y, X.in, MAIN_Y);
    anchor('source_ohm', (X.src + X.in) / 2 + 0.2, MAIN_Y - 1.6);
    shunt('shunt_ohm', 'R', 'in', 1.2);
    series('c_in_f', 'C', 'in', 'cin');
    line(ctx, X.cin, MAIN_Y, X.cin + 0.5, MAIN_Y);
    series('r_in_ohm', 'R', 'cin', 'g1');
    dot(ctx, X.g1, MAIN_Y);

    // The inverter: a triangle with a bubble, the stage count inside.
    line(ctx, X.g1, MAIN_Y, X.amp - 1.2, MAIN_Y);
    ctx.beginPath();
    ctx.moveTo((X.amp - 1.2) * U, (MAIN_Y - 1.3) * U);
    ctx.lineTo((X.amp + 1.2) * U, MAIN_Y * U);
    ctx.lineTo((X.amp - 1.2) * U, (MAIN_Y + 1.3) * U);
    ctx.closePath();
    ctx.stroke();
    ctx.beginPath();
    ctx.arc((X.amp + 1.45) * U, MAIN_Y * U, 0.25 * U, 0, 2 * Math.PI);
    ctx.stroke();
    ctx.fillText(stages > 1 ? `×${stages}` : '', (X.amp - 0.9) * U, (MAIN_Y + 0.25) * U);
    line(ctx, X.amp + 1.7, MAIN_Y, X.o, MAIN_Y);
    dot(ctx, X.o, MAIN_Y);

    // Feedback: r_fb above, c_fb above that when fitted.
    line(ctx, X.g1, MAIN_Y, X.g1, FEEDBACK_Y);
    line(ctx, X.o, MAIN_Y, X.o, FEEDBACK_Y);
    part(ctx, 'R', X.g1, FEEDBACK_Y, X.o, FEEDBACK_Y);
    anchor('r_fb_ohm', (X.g1 + X.o) / 2, FEEDBACK_Y + 1.2);
    if (label('c_fb_f')) {
      line(ctx, X.g1, FEEDBACK_Y, X.g1, FEEDBACK_Y - 1.6);
      line(ctx, X.o, FEEDBACK_Y, X.o, FEEDBACK_Y - 1.6);
      part(ctx, 'C', X.g1, FEEDBACK_Y - 1.6, X.o, FEEDBACK_Y - 1.6);
    }
    anchor('c_fb_f', (X.g1 + X.o) / 2, FEEDBACK_Y - 2.8);

    series('r_out_ohm', 'R', 'o', 'rout');
    series('c_out_f', 'C', 'rout', 'cout');
    line(ctx, X.cout, MAIN_Y, X.load + 1.4, MAIN_Y);
    dot(ctx, X.out, MAIN_Y);
    shunt('load_ohm', 'R', 'out', 2);
    shunt('load_f', 'C', 'out', 7);
    // Node names above the wire; g1's left of the feedback wire that rises from it.
    for (const [name, x] of [['in', X.in], ['out', X.out]]) ctx.fillText(name, (x - 0.3) * U, (MAIN_Y - 0.5) * U);
    ctx.textAlign = 'right';
    ctx.fillText('g1', (X.g1 - 0.2) * U, (MAIN_Y - 0.5) * U);
    ctx.textAlign = 'left';
    return anchors;
  };

  return { draw, WIDTH, HEIGHT };
})();
