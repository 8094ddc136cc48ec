// The report page's style sheet and script, kept as raw string literals so the page stays one file.
namespace settle {

extern const char* const html_style;
extern const char* const html_script;

const char* const html_style = R"SETTLE(:root{--paper:#f4f1ea;--card:#fffdf8;--rule:#d9d2c3;--ink:#22313f;--soft:#6b7280;--det:#0f7b6c;--nondet:#c8553d;--osc:#5b4b8a;--mixed:#b58b00;--tmo:#7b7f86;--mono:ui-monospace,"DejaVu Sans Mono","Liberation Mono",monospace}
*{box-sizing:border-box}
body{margin:0;background:var(--paper);color:var(--ink);font:14px/1.45 system-ui,"DejaVu Sans","Liberation Sans",sans-serif}
main{max-width:1240px;margin:0 auto;padding:18px 22px 60px}
h1{font-size:20px;margin:0 0 4px;letter-spacing:.02em}
h1 .kind{display:inline-block;background:var(--ink);color:var(--paper);border-radius:3px;padding:0 8px;margin-right:8px;font-size:15px;vertical-align:2px}
h2{font-size:16px;margin:0}
h3{font-size:13px;margin:14px 0 6px;text-transform:uppercase;letter-spacing:.08em;color:var(--soft)}
code,.mono{font-family:var(--mono);font-size:12.5px}
.head{background:var(--card);border:1px solid var(--rule);border-radius:6px;padding:14px 16px;margin-bottom:16px}
.head .cmd{display:block;background:#efe9dc;border-radius:4px;padding:6px 10px;margin-top:8px;white-space:pre-wrap;word-break:break-all}
.facts{color:var(--soft);margin-top:6px}
.facts b{color:var(--ink);font-weight:600}
.note{border-left:4px solid var(--mixed);background:#fbf3dc;padding:6px 10px;margin:6px 0;border-radius:0 4px 4px 0}
.step{background:var(--card);border:1px solid var(--rule);border-radius:6px;margin:14px 0;overflow:hidden}
.banner{display:flex;gap:14px;align-items:baseline;padding:10px 14px;border-left:10px solid var(--tmo);background:linear-gradient(90deg,#f0ece2,var(--card))}
.banner .word{font-weight:700;text-transform:uppercase;letter-spacing:.06em;font-size:13px;padding:2px 8px;border-radius:12px;color:#fff;background:var(--tmo)}
.banner .label{font-family:var(--mono)}
.banner .more{color:var(--soft);margin-left:auto;font-size:13px}
.v-deterministic,.s-settled,.s-running,.e-one{border-left-color:var(--det)}.v-deterministic .word,.s-settled .word,.s-running .word,.e-one .word{background:var(--det)}
.v-nondeterministic,.e-race{border-left-color:var(--nondet)}.v-nondeterministic .word,.e-race .word{background:var(--nondet)}
.v-oscillating,.s-oscillating,.e-stuck{border-left-color:var(--osc)}.v-oscillating .word,.s-oscillating .word,.e-stuck .word{background:var(--osc)}
.v-mixed,.e-maybe{border-left-color:var(--mixed)}.v-mixed .word,.e-maybe .word{background:var(--mixed)}
.v-deadlock,.s-deadlock,.p-violated{border-left-color:var(--nondet)}.v-deadlock .word,.s-deadlock .word,.p-violated .word{background:var(--nondet)}
.p-holds{border-left-color:var(--det)}.p-holds .word{background:var(--det)}
.owed{border-left:4px solid var(--nondet);background:#fbe9e4;padding:6px 10px;margin:6px 0;border-radius:0 4px 4px 0}
.body{padding:8px 14px 14px}
.outcomes{display:flex;flex-wrap:wrap;gap:10px}
.outcome{flex:1 1 260px;border:1px solid var(--rule);border-radius:5px;padding:8px 10px;position:relative;border-top:5px solid var(--c)}
.outcome .big{font-size:22px;font-weight:700}
.outcome .sub{color:var(--soft);font-size:12.5px}
.chips{margin-top:4px}
.chip{display:inline-block;font-family:var(--mono);font-size:12px;border:1px solid var(--rule);border-radius:10px;padding:0 7px;margin:2px 3px 0 0;background:#faf7f0}
.chip.v1{background:#e3f1ee}.chip.vx{background:repeating-linear-gradient(135deg,#f6e7e2 0 4px,#fffdf8 4px 8px)}
table{border-collapse:collapse;margin:4px 0}
td,th{padding:3px 10px 3px 0;text-align:left;vertical-align:top}
th{font-size:12px;color:var(--soft);font-weight:600;border-bottom:1px solid var(--rule)}
.pass{color:var(--det);font-weight:700}.fail{color:var(--nondet);font-weight:700}
.wave{margin-top:10px;border:1px solid var(--rule);border-radius:5px;background:#fcfaf5}
.wave .bar{display:flex;flex-wrap:wrap;gap:6px;align-items:center;padding:6px 8px;border-bottom:1px solid var(--rule)}
.wave button{font:inherit;font-size:12px;border:1px solid var(--rule);background:var(--card);border-radius:4px;padding:1px 9px;cursor:pointer;color:var(--ink)}
.wave button:hover{background:#efe9dc}
.wave .readout{margin-left:auto;font-family:var(--mono);font-size:12px;color:var(--soft)}
.toggles{display:flex;flex-wrap:wrap;gap:4px 12px;padding:4px 8px;font-family:var(--mono);font-size:12px}
.toggles label{cursor:pointer}
.legend{display:flex;flex-wrap:wrap;gap:4px 14px;padding:4px 8px;font-size:12px}
.legend i{display:inline-block;width:18px;height:10px;border-radius:2px;margin-right:5px;vertical-align:-1px}
svg.wave-svg{display:block;width:100%;cursor:grab;user-select:none}
svg.wave-svg.dragging{cursor:grabbing}
.tip{position:fixed;pointer-events:none;background:var(--ink);color:var(--paper);font-family:var(--mono);font-size:12px;padding:4px 8px;border-radius:4px;display:none;z-index:9;white-space:pre}
.row-name{font-family:var(--mono);font-size:12px;fill:var(--ink)}
.row-tag{font-family:var(--mono);font-size:10px}
.axis text{font-family:var(--mono);font-size:10.5px;fill:var(--soft)}
.part-label{font-family:var(--mono);font-size:11px;fill:var(--nondet);font-weight:700}
.hist-wrap{display:flex;gap:18px;flex-wrap:wrap;align-items:flex-start}
svg.hist text,svg.graph text,svg.probes text{font-family:var(--mono);font-size:10.5px;fill:var(--ink)}
.figure{font-size:34px;font-weight:800;letter-spacing:-.01em}
.figure small{font-size:14px;font-weight:500;color:var(--soft);margin-left:8px}
.graph-box{overflow-x:auto;border:1px solid var(--rule);border-radius:5px;background:#fcfaf5;margin-top:8px}
.noscript{padding:20px}
details.fold>summary{cursor:pointer;padding:6px 14px;color:var(--soft);font-size:12.5px}
details.fold[open]>summary{border-bottom:1px dashed var(--rule)}
)SETTLE";

const char* const html_script = R"SETTLE((function () {
  'use strict';
  var errors = [];
  function fail(e) {
    errors.push(String((e && e.message) || e));
    document.body.setAttribute('data-errors', String(errors.length));
    document.body.setAttribute('data-error-text', errors.join(' | '));
  }
  window.addEventListener('error', function (ev) { fail(ev.message || ev.error); });
  var NS = 'http://www.w3.org/2000/svg';
  var PALETTE = ['#0f7b6c', '#c8553d', '#5b4b8a', '#b58b00', '#2e6f95', '#8a3b5c', '#4f7a28', '#7a5c3e'];
  var tip = null;

  function el(tag, attrs, kids) {
    var e = document.createElement(tag);
    for (var k in attrs || {}) {
      if (k === 'text') e.textContent = attrs[k];
      else if (k === 'cls') e.className = attrs[k];
      else e.setAttribute(k, attrs[k]);
    }
    (kids || []).forEach(function (c) { if (c) e.appendChild(typeof c === 'string' ? document.createTextNode(c) : c); });
    return e;
  }
  function sv(tag, attrs, parent) {
    var e = document.createElementNS(NS, tag);
    for (var k in attrs || {}) {
      if (k === 'text') e.textContent = attrs[k]; else e.setAttribute(k, attrs[k]);
    }
    if (parent) parent.appendChild(e);
    return e;
  }
  function colour(i) { return PALETTE[(i - 1) % PALETTE.length]; }

  // Exact time text: the largest unit not above the value, every digit kept.
  var UNITS = [[1e15, 's'], [1e12, 'ms'], [1e9, 'us'], [1e6, 'ns'], [1e3, 'ps'], [1, 'fs']];
  function fmtTime(fs) {
    if (fs === null || fs === undefined) return '-';
    if (fs === 0) return '0 ps';
    for (var i = 0; i < UNITS.length; ++i) {
      var u = UNITS[i][0];
      if (fs >= u || u === 1) {
        var whole = Math.floor(fs / u), frac = fs - whole * u, digits = Math.round(Math.log10(u));
        var s = String(whole);
        if (frac > 0) {
          var f = String(frac);
          while (f.length < digits) f = '0' + f;
          s += '.' + f.replace(/0+$/, '');
        }
        return s + ' ' + UNITS[i][1];
      }
    }
  }
  // Short axis text (3 significant digits).
  function shortTime(fs) {
    if (fs === 0) return '0';
    for (var i = 0; i < UNITS.length; ++i)
      if (Math.abs(fs) >= UNITS[i][0] || i === UNITS.length - 1) return +(fs / UNITS[i][0]).toPrecision(3) + UNITS[i][1];
  }
  function pct(x, d) { return (100 * x).toFixed(d === undefined ? 2 : d) + '%'; }
  function chips(values) {
    var box = el('div', { cls: 'chips' });
    Object.keys(values || {}).forEach(function (k) {
      box.appendChild(el('span', { cls: 'chip v' + values[k], text: k + '=' + values[k] }));
    });
    return box;
  }
  function banner(cls, word, label, more) {
    return el('div', { cls: 'banner ' + cls }, [el('span', { cls: 'word', text: word }),
      el('span', { cls: 'label', text: label || '(no input change)' }), el('span', { cls: 'more', text: more || '' })]);
  }
  function table(head, rows) {
    var t = el('table');
    t.appendChild(el('tr', {}, head.map(function (h) { return el('th', { text: h }); })));
    rows.forEach(function (r) {
      t.appendChild(el('tr', {}, r.map(function (c) { return c instanceof Node ? el('td', {}, [c]) : el('td', { text: String(c) }); })));
    });
    return t;
  }
  function passCell(ok) { return el('span', { cls: ok ? 'pass' : 'fail', text: ok ? 'pass' : 'FAIL' }); }

  // ---- waveforms
  function valueAt(net, t) {
    var lo = 0, hi = net.t.length;
    while (lo < hi) { var m = (lo + hi) >> 1; if (net.t[m] <= t) lo = m + 1; else hi = m; }
    return lo ? net.v[lo - 1] : net.i;
  }
  function wavePanel(w, names) {
    var box = el('div', { cls: 'wave', 'data-step': w.step });
    var span = Math.max(w.span_fs || 1, 1);
    var pad = Math.max(1, Math.round(span * 0.04));
    var view = { a: 0, b: span + pad };
    var hidden = {};
    var bar = el('div', { cls: 'bar' });
    var readout = el('span', { cls: 'readout', text: '' });
    function btn(text, title, f) { var b = el('button', { text: text, title: title, type: 'button' }); b.addEventListener('click', f); bar.appendChild(b); }
    btn('zoom +', 'zoom in', function () { zoom(0.5, (view.a + view.b) / 2); });
    btn('zoom \u2212', 'zoom out', function () { zoom(2, (view.a + view.b) / 2); });
    btn('\u25c2', 'pan left', function () { pan(-(view.b - view.a) * 0.25); });
    btn('\u25b8', 'pan right', function () { pan((view.b - view.a) * 0.25); });
    btn('whole step', 'show the whole step', function () { view = { a: 0, b: span + pad }; draw(); });
    if (w.diverge_fs !== null && w.diverge_fs !== undefined)
      btn('go to parting', 'centre on the first difference', function () {
        var h = Math.max((view.b - view.a) / 2, 1); view = { a: w.diverge_fs - h, b: w.diverge_fs + h }; draw();
      });
    bar.appendChild(readout);
    box.appendChild(bar);
    var legend = el('div', { cls: 'legend' });
    w.traces.forEach(function (t) {
      legend.appendChild(el('span', {}, [el('i', { style: 'background:' + colour(t.outcome) }),
        'outcome ' + t.outcome + ' \u00b7 ' + t.corner + ' \u00b7 ' + t.status + ' \u00b7 ' + t.changes + ' changes' + (t.summarised ? ' (summarised)' : '')]));
    });
    legend.appendChild(el('span', {}, [el('i', { style: 'background:repeating-linear-gradient(135deg,#c8553d 0 2px,transparent 2px 5px)' }), 'x (unknown)']));
    box.appendChild(legend);
    var toggles = el('div', { cls: 'toggles' });
    names.forEach(function (n, k) {
      var cb = el('input', { type: 'checkbox', cls: 'net-toggle', 'data-net': n });
      cb.checked = true;
      cb.addEventListener('change', function () { hidden[k] = !cb.checked; draw(); });
      toggles.appendChild(el('label', {}, [cb, ' ' + n]));
    });
    box.appendChild(toggles);
    var svg = sv('svg', { 'class': 'wave-svg' });
    box.appendChild(svg);
    var NAME = 168, LANE = 20, GAP = 3, GROUP = 9, TOP = 30;
    var width = 1100, plot = width - NAME - 12;
    function X(t) { return NAME + (t - view.a) / (view.b - view.a) * plot; }
    function T(x) { return view.a + (x - NAME) / plot * (view.b - view.a); }
    function zoom(f, at) {
      var a = at - (at - view.a) * f, b = at + (view.b - at) * f;
      if (b - a < 1) { b = a + 1; }
      view = { a: a, b: b }; draw();
    }
    function pan(d) { view = { a: view.a + d, b: view.b + d }; draw(); }
    var lanes = [];
    function lanePath(net, y0, y1) {
      var hi = '', lo = '', xs = '', edges = '', busy = '';
      var n = net.t.length, k = 0, lo2 = 0, hi2 = n;
      while (lo2 < hi2) { var m = (lo2 + hi2) >> 1; if (net.t[m] <= view.a) lo2 = m + 1; else hi2 = m; }
      k = lo2;
      var cur = k ? net.v[k - 1] : net.i, from = view.a;
      var xEnd = X(view.b);
      function seg(v, a, b) {
        var xa = Math.max(X(a), NAME), xb = Math.min(X(b), xEnd);
        if (xb < xa) return;
        if (v === '1') hi += 'M' + xa.toFixed(1) + ' ' + y1 + 'V' + y0 + 'H' + xb.toFixed(1) + 'V' + y1 + 'Z';
        else if (v === '0') lo += 'M' + xa.toFixed(1) + ' ' + (y1 - 0.5) + 'H' + xb.toFixed(1);
        else xs += 'M' + xa.toFixed(1) + ' ' + y0 + 'H' + xb.toFixed(1) + 'V' + y1 + 'H' + xa.toFixed(1) + 'Z';
      }
      for (; k < n && net.t[k] <= view.b; ++k) {
        seg(cur, from, net.t[k]);
        var x = X(net.t[k]).toFixed(1);
        edges += 'M' + x + ' ' + y0 + 'V' + y1;
        cur = net.v[k]; from = net.t[k];
      }
      seg(cur, from, view.b);
      (net.busy || []).forEach(function (b) {
        if (b[1] < view.a || b[0] > view.b) return;
        var xa = Math.max(X(b[0]), NAME), xb = Math.min(X(b[1]), xEnd);
        busy += 'M' + xa.toFixed(1) + ' ' + y0 + 'H' + Math.max(xb, xa + 1).toFixed(1) + 'V' + y1 + 'H' + xa.toFixed(1) + 'Z';
      });
      return { hi: hi, lo: lo, xs: xs, edges: edges, busy: busy };
    }
    function draw() {
      width = Math.max(box.clientWidth || 1100, 600);
      plot = width - NAME - 12;
      while (svg.firstChild) svg.removeChild(svg.firstChild);
      var defs = sv('defs', {}, svg);
      var hatch = sv('pattern', { id: 'hx' + w.step, width: 6, height: 6, patternUnits: 'userSpaceOnUse', patternTransform: 'rotate(45)' }, defs);
      sv('rect', { width: 6, height: 6, fill: '#fbe9e3' }, hatch);
      sv('line', { x1: 0, y1: 0, x2: 0, y2: 6, stroke: '#c8553d', 'stroke-width': 2.2 }, hatch);
      var dots = sv('pattern', { id: 'hb' + w.step, width: 4, height: 4, patternUnits: 'userSpaceOnUse' }, defs);
      sv('rect', { width: 4, height: 4, fill: '#e9e3f3' }, dots);
      sv('circle', { cx: 2, cy: 2, r: 1, fill: '#5b4b8a' }, dots);
      var clip = sv('clipPath', { id: 'cp' + w.step }, defs);
      lanes = [];
      var y = TOP;
      var rows = sv('g', {}, svg);
      names.forEach(function (name, k) {
        if (hidden[k]) return;
        var g = sv('g', { 'class': 'net-group', 'data-net': name }, rows);
        sv('text', { x: 6, y: y + 14, 'class': 'row-name', text: name.length > 22 ? '\u2026' + name.slice(-21) : name }, g)
          .appendChild(sv('title', { text: name }));
        w.traces.forEach(function (t) {
          var c = colour(t.outcome), y0 = y + 2, y1 = y + LANE - 2;
          var row = sv('g', { 'class': 'wave-row', 'data-net': name, 'data-outcome': t.outcome }, g);
          if (w.traces.length > 1) sv('text', { x: NAME - 8, y: y + 14, 'text-anchor': 'end', 'class': 'row-tag', fill: c, text: '#' + t.outcome }, row);
          sv('rect', { x: NAME, y: y, width: plot, height: LANE, fill: (t.outcome % 2) ? '#fffdf8' : '#f8f4ec' }, row);
          var p = lanePath(t.nets[k], y0, y1);
          sv('path', { d: p.hi, fill: c, 'fill-opacity': 0.28, stroke: c, 'stroke-width': 1.4 }, row);
          sv('path', { d: p.lo, stroke: c, 'stroke-width': 1.6, fill: 'none' }, row);
          sv('path', { d: p.xs, fill: 'url(#hx' + w.step + ')', stroke: '#c8553d', 'stroke-width': 0.8 }, row);
          sv('path', { d: p.busy, fill: 'url(#hb' + w.step + ')', stroke: '#5b4b8a', 'stroke-width': 0.6 }, row);
          sv('path', { d: p.edges, stroke: c, 'stroke-width': 1, fill: 'none' }, row);
          lanes.push({ y: y, name: name, t: t, net: t.nets[k] });
          y += LANE + GAP;
        });
        y += GROUP;
      });
      var h = Math.max(y + 4, TOP + 20);
      svg.setAttribute('viewBox', '0 0 ' + width + ' ' + h);
      svg.setAttribute('height', h);
      sv('rect', { x: NAME, y: 0, width: plot, height: h }, clip);
      var axis = sv('g', { 'class': 'axis' }, svg);
      var step = Math.pow(10, Math.floor(Math.log10((view.b - view.a) / 6)));
      [1, 2, 5, 10].some(function (m) { if ((view.b - view.a) / (step * m) <= 8) { step *= m; return true; } return false; });
      for (var t0 = Math.ceil(view.a / step) * step; t0 <= view.b; t0 += step) {
        var x = X(t0);
        sv('line', { x1: x, y1: TOP - 6, x2: x, y2: h, stroke: '#e4dccb', 'stroke-width': 1 }, axis);
        sv('text', { x: x + 3, y: TOP - 10, text: '+' + shortTime(t0) }, axis);
      }
      sv('text', { x: 6, y: TOP - 10, text: 'time since step start' }, axis);
      if (w.diverge_fs !== null && w.diverge_fs !== undefined && w.diverge_fs >= view.a && w.diverge_fs <= view.b) {
        var xd = X(w.diverge_fs);
        var mark = sv('g', { 'class': 'parting', 'data-fs': w.diverge_fs }, svg);
        sv('line', { x1: xd, y1: TOP - 4, x2: xd, y2: h, stroke: '#c8553d', 'stroke-width': 1.6, 'stroke-dasharray': '5 3' }, mark);
        sv('path', { d: 'M' + xd + ' ' + (TOP - 4) + 'l-5 -7h10z', fill: '#c8553d' }, mark);
        sv('text', { x: xd + 7, y: TOP - 1, 'class': 'part-label', text: 'parts at +' + fmtTime(w.diverge_fs) }, mark);
      }
      cursor = sv('line', { x1: -10, x2: -10, y1: TOP - 4, y2: h, stroke: '#22313f', 'stroke-width': 0.8, visibility: 'hidden' }, svg);
      readout.textContent = 'view +' + fmtTime(Math.max(0, Math.round(view.a))) + ' \u2026 +' + fmtTime(Math.max(0, Math.round(view.b)));
    }
    var cursor = null, drag = null;
    function svgX(ev) { var r = svg.getBoundingClientRect(); return (ev.clientX - r.left) * (width / r.width); }
    function svgY(ev) { var r = svg.getBoundingClientRect(); return (ev.clientY - r.top) * (width / r.width); }
    svg.addEventListener('wheel', function (ev) {
      ev.preventDefault();
      var x = svgX(ev);
      if (x < NAME) return;
      zoom(ev.deltaY > 0 ? 1.25 : 0.8, T(x));
    }, { passive: false });
    svg.addEventListener('mousedown', function (ev) { drag = { x: svgX(ev), a: view.a, b: view.b }; svg.classList.add('dragging'); });
    window.addEventListener('mouseup', function () { drag = null; svg.classList.remove('dragging'); });
    svg.addEventListener('mousemove', function (ev) {
      var x = svgX(ev), yy = svgY(ev);
      if (drag) {
        var d = (drag.x - x) / plot * (drag.b - drag.a);
        view = { a: drag.a + d, b: drag.b + d }; draw(); return;
      }
      if (x < NAME) { tip.style.display = 'none'; return; }
      var t = Math.max(0, Math.round(T(x)));
      cursor.setAttribute('x1', x); cursor.setAttribute('x2', x); cursor.setAttribute('visibility', 'visible');
      var lane = null;
      lanes.forEach(function (l) { if (yy >= l.y && yy < l.y + LANE + GAP) lane = l; });
      var text = '+' + fmtTime(t) + (lane ? '  (at ' + fmtTime(lane.t.start_fs + t) + ')' : '');
      if (lane) {
        text += '\n' + lane.name + ' = ' + valueAt(lane.net, t) + '   outcome ' + lane.t.outcome + ' (' + lane.t.corner + ')';
        w.traces.forEach(function (o) {
          if (o !== lane.t) text += '\n' + lane.name + ' = ' + valueAt(o.nets[names.indexOf(lane.name)], t) + '   outcome ' + o.outcome;
        });
      }
      tip.textContent = text;
      tip.style.display = 'block';
      tip.style.left = (ev.clientX + 14) + 'px';
      tip.style.top = (ev.clientY + 12) + 'px';
    });
    svg.addEventListener('mouseleave', function () { tip.style.display = 'none'; if (cursor) cursor.setAttribute('visibility', 'hidden'); });
    box._draw = draw;
    return box;
  }

  // ---- histogram of settle times per outcome
  function histogram(h, outcomes) {
    var W = 560, H = 170, L = 40, B = 34, bins = h.bins;
    var svg = sv('svg', { 'class': 'hist', 'data-step': h.step, width: W, height: H, viewBox: '0 0 ' + W + ' ' + H });
    var totals = [], max = 1;
    for (var b = 0; b < bins; ++b) {
      var s = 0; h.counts.forEach(function (c) { s += c[b]; }); totals.push(s); max = Math.max(max, s);
    }
    var bw = (W - L - 10) / bins;
    sv('line', { x1: L, y1: H - B, x2: W - 8, y2: H - B, stroke: '#22313f' }, svg);
    sv('text', { x: L - 4, y: 14, 'text-anchor': 'end', text: String(max) }, svg);
    sv('text', { x: L - 4, y: H - B, 'text-anchor': 'end', text: '0' }, svg);
    for (b = 0; b < bins; ++b) {
      var y = H - B;
      h.counts.forEach(function (c, o) {
        if (!c[b]) return;
        var hh = c[b] / max * (H - B - 12);
        var r = sv('rect', { x: L + b * bw + 1, y: y - hh, width: Math.max(bw - 2, 1), height: hh, fill: colour(o + 1), 'class': 'bar', 'data-outcome': o + 1, 'data-count': c[b] }, svg);
        var span = h.hi_fs - h.lo_fs + 1;
        r.appendChild(sv('title', { text: 'outcome ' + (o + 1) + ': ' + c[b] + ' corners settling in [' + fmtTime(h.lo_fs + Math.ceil(b * span / bins)) + ', ' + fmtTime(h.lo_fs + Math.ceil((b + 1) * span / bins)) + ')' }));
        y -= hh;
      });
    }
    sv('text', { x: L, y: H - B + 14, text: fmtTime(h.lo_fs) }, svg);
    sv('text', { x: W - 8, y: H - B + 14, 'text-anchor': 'end', text: fmtTime(h.hi_fs) }, svg);
    sv('text', { x: (W + L) / 2, y: H - 6, 'text-anchor': 'middle', text: 'settle, detection or last-change time (corners per bin; ' + bins + ' bin' + (bins > 1 ? 's' : '') + ')' }, svg);
    return svg;
  }

  // ---- closed loops: the rules a deadlocked step owes, whole-run properties, timing gauges
  function owedBlock(owed) {
    if (!owed || !owed.length) return null;
    var box = el('div', { cls: 'owed', 'data-owed': owed.length });
    box.appendChild(el('div', { text: 'deadlock: everything went quiet while these reaction rules were still owed' }));
    box.appendChild(table(['rule', 'fired', 'times', 'condition at the end'], owed.map(function (o) {
      return [el('code', { text: o.rule }), o.fired, o.times, o.condition];
    })));
    return box;
  }
  function valuesText(v) { return Object.keys(v || {}).map(function (k) { return k + '=' + v[k]; }).join(' '); }
  function closedLoopPart(target, R, corners) {
    var props = R.properties || [], gauges = R.gauges || [];
    if (!props.length && !gauges.length) return;
    var sec = el('section', { cls: 'step closed-loop' });
    var bad = props.filter(function (p) { return p.holds === false || p.violating > 0; }).length;
    sec.appendChild(banner(bad ? 'p-violated' : 'p-holds', bad ? 'violated' : 'holds', 'whole-run properties and gauges',
      props.length + ' propert' + (props.length === 1 ? 'y' : 'ies') + ' \u00b7 ' + gauges.length + ' gauge' + (gauges.length === 1 ? '' : 's')));
    var body = el('div', { cls: 'body' });
    if (props.length) {
      body.appendChild(el('h3', { text: 'properties' }));
      if (corners === undefined)
        body.appendChild(table(['', 'property', 'first violation', 'step', 'values there'], props.map(function (p) {
          return [passCell(p.holds), el('code', { text: p.text }), p.holds ? '-' : fmtTime(p.first_violation_fs), p.holds ? '' : p.step, valuesText(p.values)];
        })));
      else
        body.appendChild(table(['', 'property', 'violating corners', 'witness'], props.map(function (p) {
          return [passCell(!p.violating), el('code', { text: p.text }), p.violating + ' of ' + p.corners, p.witness || ''];
        })));
    }
    if (gauges.length) {
      body.appendChild(el('h3', { text: corners === undefined ? 'gauges (samples of this run)' : 'gauges over corners' }));
      if (corners === undefined)
        body.appendChild(table(['gauge', 'kind', 'nets', 'samples', 'min', 'mean', 'max'], gauges.map(function (g) {
          var none = !g.count;
          return [el('code', { text: g.name }), g.kind, (g.nets || []).join(' \u2192 '), g.count, none ? '-' : fmtTime(g.min_fs), none ? '-' : fmtTime(Math.round(g.mean_fs)), none ? '-' : fmtTime(g.max_fs)];
        })));
      else
        body.appendChild(table(['gauge', 'kind', 'min (witness)', 'median of corner means', 'max (witness)', 'throughput'], gauges.map(function (g) {
          if (!g.corners) return [el('code', { text: g.name }), g.kind, 'no sample', '', '', ''];
          return [el('code', { text: g.name }), g.kind, fmtTime(g.min_fs) + ' (' + g.witness_min + ')', fmtTime(Math.round(g.median_fs)),
            fmtTime(g.max_fs) + ' (' + g.witness_max + ')', g.throughput_per_s ? (g.throughput_per_s / 1e6).toPrecision(4) + ' M/s' : ''];
        })));
    }
    sec.appendChild(body);
    target.appendChild(sec);
  }

  // ---- sweep steps (sweep report, and the margin report's written spread)
  function sweepSteps(target, steps, corners, D) {
    steps.forEach(function (st) {
      var sec = el('section', { cls: 'step', 'data-step': st.index, 'data-verdict': st.verdict });
      var more = st.outcomes.length + ' outcome' + (st.outcomes.length === 1 ? '' : 's') + ' over ' + corners + ' corners';
      if (st.first_divergence) more += ' \u00b7 first divergence';
      if (st.inherits) more += ' \u00b7 inherits step ' + st.inherits;
      sec.appendChild(banner('v-' + st.verdict, st.verdict, 'step ' + st.index + ': ' + st.label, more));
      var body = el('div', { cls: 'body' });
      var outs = el('div', { cls: 'outcomes' });
      st.outcomes.forEach(function (o, k) {
        // Settle times only for outcomes that went quiet; an oscillation's times are when its repeat was detected.
        var tm = o.settle_fs || o.detected_fs || o.last_change_fs || { min: 0, median: 0, max: 0 };
        var tw = o.settle_fs ? 'settle ' : o.detected_fs ? 'repeat detected ' : 'last change ';
        var card = el('div', { cls: 'outcome', style: '--c:' + colour(k + 1), 'data-step': st.index, 'data-rank': k + 1,
          'data-count': o.count, 'data-share': o.share, 'data-witness': o.witness,
          'data-settle-min': tm.min, 'data-settle-median': tm.median, 'data-settle-max': tm.max });
        card.appendChild(el('div', {}, [el('span', { cls: 'big', text: pct(o.share) }),
          el('span', { cls: 'sub', text: '  ' + o.count + ' of ' + corners + ' corners \u00b7 #' + (k + 1) + ' ' + o.status + (o.period_fs ? ' (period ' + fmtTime(o.period_fs) + ')' : '') })]));
        card.appendChild(el('div', { cls: 'sub', text: '95% interval ' + pct(o.share_ci95[0]) + ' \u2013 ' + pct(o.share_ci95[1]) + ' (Wilson)' }));
        card.appendChild(el('div', { cls: 'sub', text: tw + fmtTime(tm.min) + ' / ' + fmtTime(tm.median) + ' / ' + fmtTime(tm.max) + '  (min / median / max)' }));
        if (o.detail) card.appendChild(el('div', { cls: 'sub', text: o.detail }));
        card.appendChild(el('div', { cls: 'sub' }, ['witness ', el('code', { text: o.witness })]));
        card.appendChild(chips(o.values));
        var ob = owedBlock(o.owed);
        if (ob) card.appendChild(ob);
        outs.appendChild(card);
      });
      body.appendChild(outs);
      if (st.unseen_outcome_bound !== undefined)
        body.appendChild(el('p', { cls: 'sub', text: 'Chance of an outcome not seen: below ' + pct(st.unseen_outcome_bound, 3) + ' (rule of three over the random corners).' }));
      var h = (D.hist || []).filter(function (x) { return x.step === st.index; })[0];
      if (h) { body.appendChild(el('h3', { text: 'times over corners (settle; oscillating: repeat detected; timeout: last change)' })); body.appendChild(el('div', { cls: 'hist-wrap' }, [histogram(h, st.outcomes)])); }
      if (st.expect && st.expect.length) {
        body.appendChild(el('h3', { text: 'expectations' }));
        body.appendChild(table(['', 'kind', 'net', 'failing corners', 'witness'], st.expect.map(function (e) {
          return [passCell(e.pass), e.kind + (e.want ? ' ' + e.want : ''), e.net || e.gauge || '', 'failing' in e ? e.failing : (e.proven ? 'proven' : 'not proven'), e.witness || ''];
        })));
      }
      if (st.culprits) {
        body.appendChild(el('h3', { text: 'race culprits' }));
        body.appendChild(culpritTable(st.culprits, st.race));
      }
      if (st.interval)
        body.appendChild(el('p', { text: 'interval run: ' + (st.interval.proven ? 'proven deterministic for all delays in range' : 'inconclusive') }));
      var w = (D.waves || []).filter(function (x) { return x.step === st.index; })[0];
      if (w) { body.appendChild(el('h3', { text: 'witness waveforms' })); body.appendChild(wavePanel(w, D.nets)); }
      // A passing deterministic step folds away so the races stay in view.
      var quiet = st.verdict === 'deterministic' && (st.expect || []).every(function (e) { return e.pass; });
      if (quiet) {
        var det = el('details', { cls: 'fold' }, [el('summary', { text: 'outcome, settle times and expectations' })]);
        det.appendChild(body);
        sec.appendChild(det);
      } else sec.appendChild(body);
      target.appendChild(sec);
    });
  }
  function culpritTable(cs, race) {
    var corners = race && race.corners ? race.corners : ['A', 'B'];
    return table(['gate', 'delays at ' + corners[0], 'delays at ' + corners[1]], cs.map(function (c) {
      var d = c.delay_fs || [];
      return [el('code', { text: c.gate }), typeof d[0] === 'number' ? fmtTime(d[0]) : JSON.stringify(d[0]), typeof d[1] === 'number' ? fmtTime(d[1]) : JSON.stringify(d[1])];
    }));
  }

  function runSteps(target, R, D) {
    (R.steps || []).forEach(function (st) {
      var sec = el('section', { cls: 'step', 'data-step': st.index, 'data-status': st.status });
      var more = st.status === 'oscillating' ? 'period ' + fmtTime(st.period_fs) + ', repeat detected at ' + fmtTime(st.detected_fs)
        : st.settle_fs !== undefined ? 'settle ' + fmtTime(st.settle_fs) : 'last change ' + fmtTime(st.last_change_fs);
      if (st.status === 'timeout' && st.detail) more += ' \u00b7 ' + st.detail;
      more += ' \u00b7 ' + fmtTime(st.start_fs) + ' \u2026 ' + fmtTime(st.end_fs);
      sec.appendChild(banner('s-' + st.status, st.status, 'step ' + st.index + ': ' + st.label, more));
      var body = el('div', { cls: 'body' });
      body.appendChild(table(['net', 'end value', 'transitions'], Object.keys(st.values || {}).map(function (n) {
        return [el('code', { text: n }), st.values[n], st.transitions[n]];
      })));
      if (st.expect && st.expect.length)
        body.appendChild(table(['', 'expectation', 'want', 'got'], st.expect.map(function (e) {
          return [passCell(e.pass), e.gauge ? 'gauge ' + e.gauge : (e.kind || 'value') + (e.net ? ' ' + e.net : ''), e.want || (e.budget_fs !== undefined ? fmtTime(e.budget_fs) : ''), e.got || (e.got_fs !== undefined ? fmtTime(e.got_fs) : '')];
        })));
      var ob = owedBlock(st.owed);
      if (ob) body.appendChild(ob);
      if (st.resolutions && st.resolutions.length) {
        body.appendChild(el('h3', { text: 'metastable resolutions' }));
        body.appendChild(resolutionTable(st.resolutions));
      }
      var w = (D.waves || []).filter(function (x) { return x.step === st.index; })[0];
      if (w) body.appendChild(wavePanel(w, D.nets));
      sec.appendChild(body);
      target.appendChild(sec);
    });
  }

  function marginPart(target, R, D) {
    var sec = el('section', { cls: 'step margin' });
    sec.appendChild(banner(R.result === 'pass' ? 's-settled' : 'v-nondeterministic', R.result, 'delay-spread margin', R.corners_per_probe + ' corners per probe \u00b7 ' + R.corner_runs + ' corner runs'));
    var body = el('div', { cls: 'body' });
    body.appendChild(el('div', { cls: 'figure', 'data-margin': R.margin_pct }, [(R.at_least ? '\u2265 ' : '') + R.margin_pct + '%', el('small', { text: 'of the written delay spread (' + R.spec + ', seed ' + R.seed + ')' })]));
    body.appendChild(el('p', { text: R.confidence || '' }));
    var probes = R.probes || [];
    if (probes.length) {
      var W = 560, H = 60, svg = sv('svg', { 'class': 'probes', width: W, height: H, viewBox: '0 0 ' + W + ' ' + H });
      var top = Math.max(R.ceiling_pct || 100, 1);
      sv('line', { x1: 20, y1: 30, x2: W - 20, y2: 30, stroke: '#22313f' }, svg);
      probes.forEach(function (p, i) {
        var x = 20 + p.spread_pct / top * (W - 40);
        var c = sv('circle', { cx: x, cy: 30, r: 6, fill: p.pass ? '#0f7b6c' : '#c8553d', 'fill-opacity': 0.75, 'class': 'probe' }, svg);
        c.appendChild(sv('title', { text: 'probe ' + (i + 1) + ': ' + p.spread_pct + '% ' + (p.pass ? 'passes' : 'fails') }));
      });
      sv('text', { x: 20, y: 54, text: '0%' }, svg);
      sv('text', { x: W - 20, y: 54, 'text-anchor': 'end', text: top + '%' }, svg);
      sv('text', { x: W / 2, y: 14, 'text-anchor': 'middle', text: 'probes in search order: green passes, red fails' }, svg);
      body.appendChild(svg);
    }
    body.appendChild(el('h3', { text: 'per step' }));
    body.appendChild(table(['step', 'label', 'margin', 'first failure above it'], (R.steps || []).map(function (s) {
      return [s.index, s.label, (s.at_least ? '\u2265 ' : '') + s.margin_pct + '%', s.failure ? s.failure.kind + ' at ' + s.failure.spread_pct + '%, witness ' + s.failure.witness : '-'];
    })));
    if (R.failure) {
      var f = R.failure;
      body.appendChild(el('h3', { text: 'first failure just above the margin' }));
      body.appendChild(el('p', { text: 'step ' + f.step + ': ' + (f.expectation || f.verdict) + ' at ' + f.spread_pct + '% spread, ' + f.failing + ' of ' + f.corners + ' corners' + (f.detail ? ' (' + f.detail + ')' : '') }));
      body.appendChild(el('code', { cls: 'cmd', text: f.replay || '' }));
      if (f.culprits) body.appendChild(culpritTable(f.culprits, f.race));
    }
    if ((R.settle_within || []).length) {
      body.appendChild(el('h3', { text: 'settle-time budgets' }));
      body.appendChild(table(['step', 'budget', 'worst', 'margin', 'worst corner'], R.settle_within.map(function (w) {
        return [w.step, fmtTime(w.budget_fs), fmtTime(w.worst_fs), (w.margin_fs < 0 ? '\u2212' + fmtTime(-w.margin_fs) : fmtTime(w.margin_fs)), w.worst_corner];
      })));
    }
    sec.appendChild(body);
    target.appendChild(sec);
    if ((R.properties || []).length) {
      body.appendChild(el('h3', { text: 'per property' }));
      body.appendChild(table(['property', 'margin', 'first violation above it'], R.properties.map(function (p) {
        return [el('code', { text: p.text }), (p.at_least ? '\u2265 ' : '') + p.margin_pct + '%', p.failure ? 'at ' + p.failure.spread_pct + '%, witness ' + p.failure.witness : '-'];
      })));
    }
    if (D.written) {
      target.appendChild(el('h2', { text: 'At the written spread' }));
      sweepSteps(target, D.written.steps, D.written.corners, D);
      closedLoopPart(target, D.written, D.written.corners);
    }
  }

  // ---- exploration
  function graphSvg(g, names, order) {
    var layers = 0, rows = 0;
    g.nodes.forEach(function (n) { layers = Math.max(layers, n.layer + 1); rows = Math.max(rows, n.pos + 1); });
    var DX = 130, DY = 50, W = layers * DX + 60, H = rows * DY + 40;
    var svg = sv('svg', { 'class': 'graph', 'data-step': g.step, width: W, height: H, viewBox: '0 0 ' + W + ' ' + H });
    var defs = sv('defs', {}, svg);
    var m = sv('marker', { id: 'ar' + g.step, viewBox: '0 0 8 8', refX: 8, refY: 4, markerWidth: 7, markerHeight: 7, orient: 'auto' }, defs);
    sv('path', { d: 'M0 0L8 4L0 8z', fill: '#6b7280' }, m);
    function P(n) { return [40 + n.layer * DX, 30 + n.pos * DY]; }
    g.edges.forEach(function (e) {
      var a = P(g.nodes[e[0]]), b = P(g.nodes[e[1]]);
      var d;
      if (e[0] === e[1]) d = 'M' + a[0] + ' ' + (a[1] - 14) + 'c 20 -26 40 -6 14 10';
      else {
        var dx = b[0] - a[0], dy = b[1] - a[1], len = Math.max(Math.sqrt(dx * dx + dy * dy), 1);
        var sx = a[0] + dx / len * 15, sy = a[1] + dy / len * 15, ex = b[0] - dx / len * 16, ey = b[1] - dy / len * 16;
        var bend = dx <= 0 ? 30 : 10;
        d = 'M' + sx + ' ' + sy + 'Q' + ((sx + ex) / 2 - dy / len * bend) + ' ' + ((sy + ey) / 2 + dx / len * bend) + ' ' + ex + ' ' + ey;
      }
      var p = sv('path', { d: d, fill: 'none', stroke: '#9aa1ab', 'stroke-width': 1.2, 'marker-end': 'url(#ar' + g.step + ')', 'class': 'edge' }, svg);
      p.appendChild(sv('title', { text: 'fires: ' + e[2] }));
    });
    g.nodes.forEach(function (n, i) {
      var p = P(n), grp = sv('g', { 'class': 'node' + (n.stable ? ' stable' : ''), 'data-state': i }, svg);
      if (n.stable) sv('rect', { x: p[0] - 15, y: p[1] - 13, width: 30, height: 26, rx: 7, fill: '#0f7b6c', stroke: '#0b5c51', 'stroke-width': n.start ? 3 : 1 }, grp);
      else sv('circle', { cx: p[0], cy: p[1], r: 13, fill: '#fffdf8', stroke: n.start ? '#22313f' : '#9aa1ab', 'stroke-width': n.start ? 3 : 1.2 }, grp);
      sv('text', { x: p[0], y: p[1] + 25, 'text-anchor': 'middle', 'class': 'state-label', text: n.state }, grp);
      sv('text', { x: p[0], y: p[1] + 4, 'text-anchor': 'middle', fill: n.stable ? '#fff' : '#22313f', text: String(i) }, grp);
      grp.appendChild(sv('title', { text: 'state ' + i + (n.start ? ' (start)' : '') + (n.stable ? ' (stable)' : '') + '\n' + order + ' = ' + n.state + '\n' + names.join(' ') + ' = ' + n.values }));
    });
    return svg;
  }
  // A closed system's firing sequence: instants in order, the firings of one instant together.
  function pathText(p) {
    if (!p || !p.length) return 'at the step\u2019s start';
    return p.map(function (inst) {
      var t = inst.map(function (f) { return f.gate !== undefined ? f.gate + '=' + f.value : 'rule ' + f.rule; }).join(' ');
      return inst.length > 1 ? '(' + t + ')' : t;
    }).join(' \u2192 ');
  }
  function timedCell(t) {
    if (!t) return '';
    if (t.feasible) return el('div', {}, [el('code', { text: t.replay || t.corner }), el('div', { cls: 'legend', text: t.confirmed ? 'replayed in the timed kernel' : 'not confirmed: ' + (t.why || '') })]);
    return el('span', { text: (t.exact ? 'no delays within the ranges' : 'not decided') + (t.why ? ': ' + t.why : '') });
  }
  function closedFindings(body, st) {
    if (st.deadlocks === undefined) return;
    body.appendChild(el('h3', { text: 'deadlocks (quiet while a rule is owed)' }));
    if (st.deadlocks.length) body.appendChild(table(['state bits', 'inputs', 'owed', 'firing sequence', 'timed'], st.deadlocks.map(function (x) {
      return [el('code', { text: x.state }), chips(x.inputs), x.owed.map(function (o) { return 'rule ' + o.rule + ' (' + o.fired + ' of ' + o.times + ')'; }).join(', '), pathText(x.path), timedCell(x.timed)];
    })));
    else body.appendChild(el('p', { text: st.complete ? 'none reachable' : 'none found (incomplete)' }));
    if (st.properties.length) {
      body.appendChild(el('h3', { text: 'properties' }));
      body.appendChild(table(['property', 'verdict', 'firing sequence', 'timed'], st.properties.map(function (x) {
        return [el('code', { text: x.text }), x.holds ? (x.proved ? 'holds' : 'not violated (incomplete)') : 'VIOLATED', x.holds ? '' : pathText(x.path), timedCell(x.timed)];
      })));
    }
    body.appendChild(el('h3', { text: 'gates not persistent (excited, then disabled without firing)' }));
    if (st.nonpersistent.length) body.appendChild(table(['gate', 'output', 'firing sequence', 'timed'], st.nonpersistent.map(function (x) {
      return [el('code', { text: x.gate }), x.output ? 'yes' : 'no', pathText(x.path), timedCell(x.timed)];
    })));
    else body.appendChild(el('p', { text: st.complete ? 'every gate is persistent' : 'none found (incomplete)' }));
  }
  function exploreSteps(target, R, D) {
    (R.steps || []).forEach(function (st) {
      var race = st.critical_race === true, stuck = st.must_oscillate === true, may = st.may_oscillate === true;
      var dead = (st.deadlocks || []).length > 0, broken = (st.properties || []).some(function (p) { return !p.holds; });
      var cls = dead || broken || race ? 'e-race' : stuck ? 'e-stuck' : may ? 'e-maybe' : 'e-one';
      var word = dead ? 'deadlock' : broken ? 'property violated' : race ? 'critical race' : stuck ? 'stuck oscillating' : may ? 'may oscillate' : (st.stable.length === 1 ? 'one stable state' : st.stable.length + ' stable states');
      var sec = el('section', { cls: 'step', 'data-step': st.index });
      sec.appendChild(banner(cls, word, 'step ' + st.index + ': ' + st.label, st.states + ' states \u00b7 ' + st.edges + ' edges' + (st.complete ? '' : ' \u00b7 incomplete')));
      var body = el('div', { cls: 'body' });
      body.appendChild(el('h3', { text: 'reachable stable states' }));
      body.appendChild(table(['#', 'values', 'state bits', 'firings from a start state'], st.stable.map(function (s, k) {
        return [k + 1, chips(s.values), el('code', { text: s.state }), s.path.length];
      })));
      body.appendChild(el('p', {}, ['ternary simulation: ', chips(st.ternary)]));
      body.appendChild(el('p', { text: 'may oscillate: ' + st.may_oscillate + ' \u00b7 must oscillate: ' + st.must_oscillate + ' \u00b7 non-critical race: ' + st.noncritical_race + ' \u00b7 hazards (' + st.hazards_from + '): ' + (st.hazards.length ? st.hazards.join(', ') : 'none') }));
      if (st.stopped) body.appendChild(el('p', { cls: 'note', text: 'stopped: ' + st.stopped }));
      closedFindings(body, st);
      var g = (D.graphs || []).filter(function (x) { return x.step === st.index; })[0];
      if (g) {
        body.appendChild(el('h3', { text: 'state graph (layers by firing depth; filled squares are stable states, thick outlines start states)' }));
        body.appendChild(el('p', { cls: 'legend' }, ['state bits, left to right: ', el('code', { text: D.state_order })]));
        body.appendChild(el('div', { cls: 'graph-box' }, [graphSvg(g, D.nets, D.state_order)]));
      }
      sec.appendChild(body);
      target.appendChild(sec);
    });
  }

  // ---- metastable elements: resolutions of a run, per-element figures of a sweep, the MTBF page
  function resolutionTable(list) {
    return table(['element', 'output', 'first event', 'gap (\u0394 or \u03b4)', 'drawn', 'value', 'resolution'], list.map(function (r) {
      var gap = r.delta_fs !== undefined ? r.delta_fs : r.lead_fs;
      return [el('code', { text: r.element }), el('code', { text: r.output }), fmtTime(r.first_fs),
        gap === null || gap === undefined ? 'outside the window' : (gap < 0 ? '-' + fmtTime(-gap) : fmtTime(gap)),
        r.drawn ? 'yes' : '', r.value, fmtTime(r.resolution_fs)];
    }));
  }
  function elementsPart(target, R) {
    var els = R.elements || [];
    if (!els.length) return;
    var sec = el('section', { cls: 'step meta-elements', 'data-elements': els.length });
    var over = 0;
    els.forEach(function (e) { (e.budgets || []).forEach(function (b) { over += b.exceeded; }); });
    sec.appendChild(banner(over ? 'v-nondeterministic' : 's-settled', over ? 'slow' : 'within', 'metastable elements',
      els.length + ' element' + (els.length === 1 ? '' : 's') + ' \u00b7 ' + R.corners + ' corners'));
    var body = el('div', { cls: 'body' });
    body.appendChild(table(['element', 'kind', 'resolutions', 'inside the window', 'drawn ties', 'longest (witness)'], els.map(function (e) {
      return [el('code', { text: e.element }), e.kind, e.resolutions, e.inside_window, e.drawn,
        e.resolutions ? fmtTime(e.longest_fs) + ' (' + e.witness + ')' : '-'];
    })));
    var rows = [];
    els.forEach(function (e) {
      (e.budgets || []).forEach(function (b) {
        rows.push([el('code', { text: e.element }), fmtTime(b.within_fs), b.exceeded,
          (100 * b.share).toPrecision(3) + '% (' + (100 * b.share_ci95[0]).toPrecision(3) + ' \u2026 ' + (100 * b.share_ci95[1]).toPrecision(3) + '%)',
          (100 * b.model_share).toPrecision(3) + '%']);
      });
    });
    if (rows.length) {
      body.appendChild(el('h3', { text: 'resolves within: corners over the budget, against the model' }));
      body.appendChild(table(['element', 'budget', 'corners over it', 'share (95% Wilson interval)', 'model share'], rows));
    }
    sec.appendChild(body);
    target.appendChild(sec);
  }
  function secondsText(s) {
    if (s === null || s === undefined) return 'unbounded';
    return s.toPrecision(3) + ' s (' + (s / 31557600).toPrecision(3) + ' years)';
  }
  // log10 of the MTBF against the budget is a straight line: t / (tau ln 10) - log10(k W f1 f2).
  function mtbfPlot(R) {
    var f = Object.keys(R.rates_hz).map(function (k) { return R.rates_hz[k]; });
    var k = R.kind === 'mutex' ? 2 : 1, T = Math.max(R.budget_fs * 2, 1);
    function line(tau, w) {
      return function (t) { return tau ? t / (tau * Math.LN10) - Math.log10(k * w * 1e-15 * f[0] * f[1]) : Infinity; };
    }
    var typ = line(R.tau_fs[1], R.window_fs[1]), worst = line(R.mtbf.worst_tau_fs, R.mtbf.worst_window_fs);
    var S = R.simulation, ys = [typ(0), typ(T), worst(0), worst(T)].filter(isFinite);
    if (S.failures) ys.push(-Math.log10(S.interval_hz[1]), -Math.log10(S.interval_hz[0]));
    if (!ys.length) return null;
    var lo = Math.floor(Math.min.apply(null, ys)), hi = Math.ceil(Math.max.apply(null, ys));
    if (hi === lo) hi = lo + 1;
    var W = 560, H = 220, L = 56, B = 30;
    var x = function (t) { return L + t / T * (W - L - 12); }, y = function (v) { return H - B - (v - lo) / (hi - lo) * (H - B - 12); };
    var svg = sv('svg', { 'class': 'mtbf-plot', width: W, height: H, viewBox: '0 0 ' + W + ' ' + H });
    sv('line', { x1: L, y1: H - B, x2: W - 12, y2: H - B, stroke: '#22313f' }, svg);
    sv('line', { x1: L, y1: 12, x2: L, y2: H - B, stroke: '#22313f' }, svg);
    for (var v = lo; v <= hi; v += Math.max(1, Math.round((hi - lo) / 6)))
      sv('text', { x: L - 6, y: y(v) + 4, 'text-anchor': 'end', text: '1e' + v + ' s' }, svg);
    sv('text', { x: L, y: H - 8, text: '0' }, svg);
    sv('text', { x: W - 12, y: H - 8, 'text-anchor': 'end', text: fmtTime(T) }, svg);
    sv('text', { x: (L + W) / 2, y: H - 8, 'text-anchor': 'middle', text: 'budget beyond D' }, svg);
    [[typ, '#0f7b6c', 'typ'], [worst, '#c8553d', 'worst']].forEach(function (c) {
      if (!isFinite(c[0](0))) return;
      var p = sv('line', { x1: x(0), y1: y(c[0](0)), x2: x(T), y2: y(c[0](T)), stroke: c[1], 'stroke-width': 2, 'class': 'mtbf-' + c[2] }, svg);
      p.appendChild(sv('title', { text: c[2] + ': MTBF from the formula' }));
    });
    sv('line', { x1: x(R.budget_fs), y1: 12, x2: x(R.budget_fs), y2: H - B, stroke: '#888', 'stroke-dasharray': '4 3' }, svg);
    if (S.failures) {
      var bx = x(R.budget_fs);
      sv('line', { x1: bx, y1: y(-Math.log10(S.interval_hz[1])), x2: bx, y2: y(-Math.log10(S.interval_hz[0])), stroke: '#22313f', 'stroke-width': 3 }, svg);
      var c = sv('circle', { cx: bx, cy: y(-Math.log10(S.observed_rate_hz)), r: 5, fill: '#22313f', 'class': 'mtbf-simulated' }, svg);
      c.appendChild(sv('title', { text: 'simulated: ' + S.failures + ' failures, 95% interval' }));
    }
    return svg;
  }
  function mtbfPart(target, R) {
    var S = R.simulation || {};
    var sec = el('section', { cls: 'step mtbf', 'data-agrees': S.agrees ? '1' : '0' });
    var word = R.min_mtbf_s !== undefined ? (R.pass ? 'pass' : 'fail') : (S.agrees ? 'agree' : 'disagree');
    sec.appendChild(banner(R.pass && S.agrees ? 's-settled' : 'v-nondeterministic', word, R.element + ' (' + R.kind + ')',
      'budget ' + fmtTime(R.budget_fs) + ' beyond the element\'s delay'));
    var body = el('div', { cls: 'body' });
    body.appendChild(el('div', { cls: 'figure', 'data-mtbf-worst': R.mtbf.worst_s === null ? 'inf' : R.mtbf.worst_s },
      [secondsText(R.mtbf.worst_s), el('small', { text: 'worst MTBF (tau ' + fmtTime(R.mtbf.worst_tau_fs) + ', window ' + fmtTime(R.mtbf.worst_window_fs) + ')' })]));
    body.appendChild(el('p', { text: 'typ MTBF ' + secondsText(R.mtbf.typ_s) + (R.min_mtbf_s !== undefined ? ' \u00b7 required at least ' + secondsText(R.min_mtbf_s) : '') }));
    var plot = mtbfPlot(R);
    if (plot) body.appendChild(plot);
    body.appendChild(el('h3', { text: 'parameters' }));
    body.appendChild(table(['', 'min', 'typ', 'max'], [['tau'].concat(R.tau_fs.map(fmtTime)), ['window'].concat(R.window_fs.map(fmtTime))]));
    body.appendChild(table(['input', 'rate'], Object.keys(R.rates_hz).map(function (n) {
      return [el('code', { text: n }), (R.rates_hz[n] / 1e6).toPrecision(4) + ' MHz'];
    })));
    body.appendChild(el('h3', { text: 'check by simulation (corner ' + S.corner + ', seed ' + S.seed + ')' }));
    body.appendChild(table(['D', 'tau', 'window', 'events', 'simulated time', 'resolutions', 'longer than D + budget'], [[
      fmtTime(S.delay_fs), fmtTime(S.tau_fs), fmtTime(S.window_fs), S.events, S.duration_s.toPrecision(4) + ' s', S.resolutions, S.failures]]));
    body.appendChild(table(['failure rate observed', '95% interval', 'formula', ''], [[
      S.observed_rate_hz.toPrecision(4) + '/s', S.interval_hz[0].toPrecision(4) + ' \u2026 ' + S.interval_hz[1].toPrecision(4) + '/s',
      S.formula_rate_hz.toPrecision(4) + '/s', el('span', { cls: S.agrees ? 'pass' : 'fail', text: S.agrees ? 'agree' : 'DISAGREE' })]]));
    sec.appendChild(body);
    target.appendChild(sec);
  }

  function render() {
    var D = JSON.parse(document.getElementById('settle-data').textContent);
    var R = D.result || {};
    var root = document.getElementById('report');
    tip = el('div', { cls: 'tip' });
    document.body.appendChild(tip);
    var head = el('header', { cls: 'head' });
    head.appendChild(el('h1', {}, [el('span', { cls: 'kind', text: D.kind }), D.design]));
    head.appendChild(el('code', { cls: 'cmd', text: D.invocation }));
    var facts = 'settle ' + D.version + ' \u00b7 ' + D.gates + ' gates \u00b7 ' + D.net_count + ' nets';
    if (D.nets.length) facts += ' \u00b7 reported: ' + D.nets.join(', ');
    if (R.corner) facts += ' \u00b7 corner ' + R.corner;
    if (R.corners !== undefined) facts += ' \u00b7 ' + R.corners + ' corners (' + R.spec + ', seed ' + R.seed + ')';
    if (R.model) facts += ' \u00b7 model ' + R.model;
    if (R.result) facts += ' \u00b7 result ' + R.result;
    head.appendChild(el('div', { cls: 'facts', text: facts }));
    root.appendChild(head);
    (D.notes || []).concat(R.notes || []).forEach(function (n) { root.appendChild(el('div', { cls: 'note', text: n })); });
    if (D.kind === 'sweep') { sweepSteps(root, R.steps || [], R.corners, D); closedLoopPart(root, R, R.corners); elementsPart(root, R); }
    else if (D.kind === 'run') { runSteps(root, R, D); closedLoopPart(root, R, undefined); }
    else if (D.kind === 'margin') marginPart(root, R, D);
    else if (D.kind === 'explore') exploreSteps(root, R, D);
    else if (D.kind === 'mtbf') mtbfPart(root, R);
    var panels = document.querySelectorAll('.wave');
    for (var i = 0; i < panels.length; ++i) panels[i]._draw();
    window.addEventListener('resize', function () { for (var i = 0; i < panels.length; ++i) panels[i]._draw(); });
    document.body.setAttribute('data-rendered', '1');
  }
  try { render(); } catch (e) { fail(e); }
})();
)SETTLE";

}  // namespace settle
