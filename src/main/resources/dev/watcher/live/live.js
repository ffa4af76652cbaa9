/* The live page: reads the runs, draws their plots, follows the server's event stream. Data is always
   inserted as text, never as markup. */
(function () {
  'use strict';

  // Okabe-Ito colours (safe for the common colour-vision deficiencies), each series also has its own dash
  var COLOURS = ['#0072B2', '#E69F00', '#009E73', '#CC79A7', '#56B4E9', '#D55E00', '#000000', '#8C6D1F'];
  var DASHES = [[], [9, 4], [2, 3], [12, 3, 3, 3], [5, 5], [14, 4, 2, 4, 2, 4]];
  var MAX_POINTS = 4000;
  var MAX_MONITOR_PLOTS = 6;
  var MAX_EVENTS = 60;
  // level lines of the residual plot: neutral greys, apart from the series' colours, each with its own dash
  var LEVEL_STYLES = [{ stroke: '#7d838c', dash: [2, 3] }, { stroke: '#22303f', dash: [8, 4] }];

  var tokenMatch = /[?&]token=([^&]*)/.exec(location.search);
  var token = tokenMatch ? tokenMatch[1] : null;
  var check = { runs: 0, charts: 0, canvases: 0, nonBlank: 0, progress: 0, timeline: 0, livePoints: 0,
    levels: [], errors: [] };
  window.addEventListener('error', function (e) { check.errors.push(String(e.message)); });
  window.addEventListener('unhandledrejection', function (e) { check.errors.push(String(e.reason)); });

  var runs = new Map();
  var runsEl = document.getElementById('runs');

  function url(path, params) {
    var parts = [];
    Object.keys(params || {}).forEach(function (k) {
      parts.push(encodeURIComponent(k) + '=' + encodeURIComponent(params[k]));
    });
    if (token !== null) parts.push('token=' + token);
    return path + (parts.length ? '?' + parts.join('&') : '');
  }

  function getJson(path, params) {
    return fetch(url(path, params)).then(function (r) {
      if (!r.ok) throw new Error(path + ' answered ' + r.status);
      return r.json();
    });
  }

  function num(v) { return typeof v === 'number' ? v : Number(v); }

  function fmt(v, sci) {
    v = num(v);
    if (!isFinite(v)) return String(v);
    if (sci) return v.toExponential(2);
    var a = Math.abs(v);
    return (a !== 0 && (a < 1e-3 || a >= 1e6)) ? v.toExponential(3) : String(Number(v.toPrecision(5)));
  }

  function el(tag, cls, text) {
    var e = document.createElement(tag);
    if (cls) e.className = cls;
    if (text !== undefined && text !== null) e.textContent = String(text);
    return e;
  }

  function style(i) { return { stroke: COLOURS[i % COLOURS.length], dash: DASHES[i % DASHES.length] }; }

  // --- cards --------------------------------------------------------------------------------------------

  function ensureRun(status) {
    var r = runs.get(status.run);
    if (r) return r;
    var card = el('article', 'run');
    var h = el('h2');
    h.appendChild(el('span', 'name', status.run));
    var badge = el('span', 'state');
    h.appendChild(badge);
    card.appendChild(h);
    var counts = el('p', 'counts');
    card.appendChild(counts);
    var conds = el('div', 'conds');
    card.appendChild(conds);
    var values = el('div', 'values');
    card.appendChild(values);
    var outlook = el('div', 'outlook');
    card.appendChild(outlook);
    var resPlot = el('div', 'plot');
    resPlot.appendChild(el('h3', null, 'residuals'));
    var resBox = el('div');
    resPlot.appendChild(resBox);
    card.appendChild(resPlot);
    var monPlots = el('div', 'plot');
    card.appendChild(monPlots);
    var tl = el('div', 'timeline');
    tl.appendChild(el('h3', null, 'timeline'));
    var scroll = el('div', 'scroll');
    var table = el('table');
    var body = el('tbody');
    table.appendChild(body);
    scroll.appendChild(table);
    tl.appendChild(scroll);
    card.appendChild(tl);
    runsEl.appendChild(card);
    document.getElementById('empty').hidden = true;
    r = { name: status.run, card: card, badge: badge, counts: counts, conds: conds, values: values,
      outlook: outlook, resBox: resBox, monPlots: monPlots, events: body, seqs: new Set(), floor: 0, maxSeq: 0,
      eventsLoaded: false, res: null, mons: new Map(), loaded: false, status: status };
    runs.set(status.run, r);
    check.runs = runs.size;
    updateCard(r, status);
    return r;
  }

  var STATE_TEXT = { 'following': '● following', 'catching-up': '◔ catching up', 'ended': '■ ended' };

  function updateCard(r, s) {
    r.status = s;
    r.card.dataset.state = s.state;
    r.badge.dataset.state = s.state;
    r.badge.textContent = STATE_TEXT[s.state] || s.state;
    var bad = 0;
    Object.keys(s.malformed || {}).forEach(function (k) { bad += num(s.malformed[k]); });
    r.counts.textContent = 'iteration ' + (s.iter < 0 ? '–' : s.iter) + ' · ' + s.lines + ' lines · '
      + s.records + ' records · ' + bad + ' malformed';
    r.conds.replaceChildren();
    if (!s.open || s.open.length === 0) {
      r.conds.appendChild(el('span', 'none', 'no open conditions'));
    } else {
      s.open.forEach(function (p) { r.conds.appendChild(el('span', 'cond', p)); });
    }
    r.values.replaceChildren(valueTable('equation', 'residual', s.residuals, true),
      valueTable('monitor', 'value', s.monitors, false));
    showOutlook(r.outlook, s.forecast || {});
  }

  // --- outlook: the forecasts of the run's last save ------------------------------------------------------

  var STATUS_MARK = { 'reached': '✓', 'converging': '↘', 'not converging': '→', 'unknown': '?' };

  function has(o, k) { return o && o[k] !== undefined && o[k] !== null && isFinite(num(o[k])); }

  function count(v) { return String(Math.round(num(v))); }

  // a wall time in whole seconds as a short text: 45 s, 12 min, 3 h 05 min
  function span(sec) {
    var s = Math.round(num(sec));
    if (s < 120) return s + ' s';
    var m = Math.round(s / 60);
    if (m < 120) return m + ' min';
    var mm = m % 60;
    return Math.floor(m / 60) + ' h ' + (mm < 10 ? '0' : '') + mm + ' min';
  }

  // a value with its interval: "640 (590–710)"; the interval only when it differs from the value
  function withRange(f, key, show) {
    if (!has(f, key)) return '–';
    var v = num(f[key]);
    var text = show(v);
    if (has(f, key + '_low') && has(f, key + '_high')) {
      var lo = Math.min(num(f[key + '_low']), num(f[key + '_high']));
      var hi = Math.max(num(f[key + '_low']), num(f[key + '_high']));
      if (show(lo) !== text || show(hi) !== text) text += ' (' + show(lo) + '–' + show(hi) + ')';
    }
    return text;
  }

  function row(cells, cls) {
    var tr = el('tr');
    cells.forEach(function (c, i) { tr.appendChild(el('td', cls && cls[i] ? cls[i] : null, c)); });
    return tr;
  }

  function headRow(names, cls) {
    var tr = el('tr');
    names.forEach(function (n, i) { tr.appendChild(el('th', cls && cls[i] ? cls[i] : null, n)); });
    return tr;
  }

  function showOutlook(box, f) {
    var eqs = f.equations || [];
    var mons = f.monitors || [];
    var parts = [el('h3', null, 'outlook · last save')];
    if (eqs.length === 0 && mons.length === 0) {
      parts.push(el('p', 'none', 'no forecast yet: it comes with the first saved state'));
      box.replaceChildren.apply(box, parts);
      return;
    }
    if (f.verdict) {
      var judge = 'convergence judge: ' + f.verdict;
      if (f.waiting_for && f.waiting_for.length) judge += ' · waiting for ' + f.waiting_for.join(', ');
      parts.push(el('p', 'judge', judge));
    }
    var timed = has(f, 'iterations_per_second');
    if (eqs.length) {
      var t = el('table', 'fc-eq');
      var head = ['equation', 'target', 'outlook', 'iterations to target'];
      var cls = [null, 'v', null, 'v', 'v'];
      if (timed) head.push('time to target');
      t.appendChild(headRow(head, cls));
      eqs.forEach(function (q) {
        var st = el('td', 'st', (STATUS_MARK[q.status] || '·') + ' ' + q.status);
        st.dataset.status = q.status;
        var iters = q.status === 'reached' ? 'at target' : withRange(q, 'iterations', count);
        var cells = [q.name, has(q, 'target') ? fmt(q.target, true) : '–'];
        var tr = row(cells, cls);
        tr.appendChild(st);
        tr.appendChild(el('td', 'v', iters));
        if (timed) tr.appendChild(el('td', 'v', q.status === 'reached' ? 'now' : withRange(q, 'seconds', span)));
        t.appendChild(tr);
      });
      parts.push(t);
    }
    if (mons.length) {
      var m = el('table', 'fc-mon');
      var mcls = [null, null, 'v', 'v', 'v'];
      m.appendChild(headRow(['monitor', 'state', 'value', 'predicted final', 'remaining error'], mcls));
      mons.forEach(function (x) {
        m.appendChild(row([x.name, x.state || '–', has(x, 'value') ? fmt(x.value) : '–',
          has(x, 'predicted_final') ? fmt(x.predicted_final) : '–',
          has(x, 'remaining_error') ? fmt(x.remaining_error) : '–'], mcls));
      });
      parts.push(m);
    }
    if (timed) {
      parts.push(el('p', 'rate', 'times at ' + fmt(f.iterations_per_second) + ' iterations/s'
        + (has(f, 'rate_seconds') ? ', the pace of the last ' + span(f.rate_seconds) : '')
        + '; ranges are the fit\'s interval only'));
    }
    box.replaceChildren.apply(box, parts);
  }

  function valueTable(what, col, map, sci) {
    var t = el('table');
    var head = el('tr');
    head.appendChild(el('th', null, what));
    head.appendChild(el('th', null, col));
    t.appendChild(head);
    var names = Object.keys(map || {});
    names.forEach(function (n, i) {
      var tr = el('tr');
      var name = el('td');
      var sw = el('span', 'swatch');
      sw.style.borderTopColor = style(i).stroke;
      sw.style.borderTopStyle = style(i).dash.length ? 'dashed' : 'solid';
      name.appendChild(sw);
      name.appendChild(document.createTextNode(n));
      tr.appendChild(name);
      tr.appendChild(el('td', 'v', fmt(map[n], sci)));
      t.appendChild(tr);
    });
    if (names.length === 0) {
      var tr = el('tr');
      tr.appendChild(el('td', 'none', 'none yet'));
      t.appendChild(tr);
    }
    return t;
  }

  // --- plots --------------------------------------------------------------------------------------------

  function clean(v, log) {
    v = num(v);
    if (!isFinite(v)) return null;
    if (log && v <= 0) return null;
    return v;
  }

  // traces of one plot share the x column: merge their iterations, leave gaps where a trace has none
  function align(traces, log) {
    var xs = new Set();
    traces.forEach(function (t) { t.x.forEach(function (x) { xs.add(x); }); });
    var x = Array.from(xs).sort(function (a, b) { return a - b; });
    var index = new Map();
    x.forEach(function (v, i) { index.set(v, i); });
    var data = [x];
    traces.forEach(function (t) {
      var col = new Array(x.length).fill(null);
      for (var i = 0; i < t.x.length; i++) col[index.get(t.x[i])] = clean(t.last[i], log);
      data.push(col);
    });
    return data;
  }

  // horizontal level lines with their labels, over the plotting area, after the series are drawn
  function drawLevels(u, levels, drawnOut) {
    drawnOut.length = 0;
    if (!levels || levels.length === 0) return;
    var ctx = u.ctx;
    var b = u.bbox;
    var px = window.devicePixelRatio || 1;
    ctx.save();
    ctx.beginPath();
    ctx.rect(b.left, b.top, b.width, b.height);
    ctx.clip();
    levels.forEach(function (l, i) {
      var v = num(l.value);
      var y = u.valToPos(v, 'y', true);
      if (!isFinite(y) || y < b.top || y > b.top + b.height) return;
      y = Math.round(y) + 0.5;
      var st = LEVEL_STYLES[i % LEVEL_STYLES.length];
      ctx.strokeStyle = st.stroke;
      ctx.lineWidth = px;
      ctx.setLineDash(st.dash.map(function (d) { return d * px; }));
      ctx.beginPath();
      ctx.moveTo(b.left, y);
      ctx.lineTo(b.left + b.width, y);
      ctx.stroke();
      ctx.setLineDash([]);
      ctx.font = Math.round(11 * px) + 'px system-ui, sans-serif';
      ctx.textAlign = 'right';
      ctx.textBaseline = 'bottom';
      var right = b.left + b.width - 4 * px;
      var tw = ctx.measureText(l.label).width;
      // a pale ground under the label, so a series passing behind it does not hide it
      ctx.fillStyle = 'rgba(255, 255, 255, 0.85)';
      ctx.fillRect(right - tw - 2 * px, y - 14 * px, tw + 4 * px, 12 * px);
      ctx.fillStyle = st.stroke;
      ctx.fillText(l.label, right, y - 2 * px);
      drawnOut.push({ label: l.label, value: v, y: y, stroke: st.stroke });
    });
    ctx.restore();
  }

  // a log scale that always shows the level lines, so the distance to them reads at a glance; a line keeps a
  // margin from the plot's edge (a line on the axis would hide in it)
  function levelRange(levels) {
    return function (u, min, max) {
      (levels || []).forEach(function (l) {
        var v = num(l.value);
        if (!(v > 0)) return;
        min = min === null || min === undefined ? v / 2 : Math.min(min, v / 2);
        max = max === null || max === undefined ? v * 2 : Math.max(max, v * 2);
      });
      if (min === null || min === undefined) return [min, max];
      return uPlot.rangeLog(min, max, 10, false);
    };
  }

  function makePlot(box, names, data, log, height, levels) {
    var width = Math.max(300, box.clientWidth || 520);
    var series = [{ label: 'iteration' }];
    names.forEach(function (n, i) {
      var st = style(i);
      series.push({ label: n, stroke: st.stroke, dash: st.dash, width: 1.6, spanGaps: true, points: { show: false },
        value: function (u, v) { return v === null || v === undefined ? '–' : fmt(v, log); } });
    });
    var opts = {
      width: width, height: height,
      scales: { x: { time: false }, y: log ? { distr: 3, range: levelRange(levels) } : {} },
      axes: [{ label: 'iteration' }, { size: 64, values: function (u, vals) {
        return vals.map(function (v) { return v === null ? '' : fmt(v, log); });
      } }],
      series: series,
      cursor: { drag: { x: true, y: false } },
      legend: { show: names.length > 1, live: true },
      hooks: { draw: [function (u) { drawLevels(u, levels, drawnLevels); }] }
    };
    var drawnLevels = [];
    box.replaceChildren();
    var plot = new uPlot(opts, data, box);
    check.charts++;
    return { plot: plot, names: names.slice(), data: data, log: log, levels: drawnLevels };
  }

  function buildPlots(r, p) {
    if (r.res) { r.res.plot.destroy(); check.charts--; r.res = null; }
    r.mons.forEach(function (m) { m.plot.destroy(); check.charts--; });
    r.mons = new Map();
    r.monPlots.replaceChildren();
    if (p.residuals.length > 0) {
      r.res = makePlot(r.resBox, p.residuals.map(function (t) { return t.name; }), align(p.residuals, true), true, 240,
        p.residualLevels || []);
    } else {
      r.resBox.replaceChildren(el('p', 'none', 'no residuals yet'));
    }
    p.monitors.slice(0, MAX_MONITOR_PLOTS).forEach(function (t, i) {
      r.monPlots.appendChild(el('h3', null, 'monitor · ' + t.name));
      var box = el('div');
      r.monPlots.appendChild(box);
      var m = makePlot(box, [t.name], align([t], false), false, 150);
      m.styleIndex = i;
      r.mons.set(t.name, m);
    });
  }

  function thin(data) {
    // keep the newest half as it is and every second point of the older half
    var n = data[0].length;
    var half = Math.floor(n / 2);
    data.forEach(function (col, c) {
      var kept = [];
      for (var i = 0; i < half; i += 2) kept.push(col[i]);
      data[c] = kept.concat(col.slice(half));
    });
  }

  function append(p, iter, values) {
    var data = p.data;
    var x = data[0];
    if (x.length > 0 && iter <= x[x.length - 1]) return false;
    x.push(iter);
    p.names.forEach(function (n, i) { data[i + 1].push(values && n in values ? clean(values[n], p.log) : null); });
    if (x.length > MAX_POINTS) thin(data);
    p.plot.setData(data);
    return true;
  }

  function sameNames(a, b) { return a.length === b.length && a.every(function (n, i) { return n === b[i]; }); }

  function liveUpdate(r, s) {
    if (!r.loaded || s.iter < 0) return;
    var resNames = Object.keys(s.residuals || {});
    var monNames = Object.keys(s.monitors || {}).slice(0, MAX_MONITOR_PLOTS);
    var known = r.res ? r.res.names : [];
    var monKnown = Array.from(r.mons.keys());
    if ((resNames.length && !sameNames(resNames, known)) || (monNames.length && !sameNames(monNames, monKnown))) {
      loadPlots(r); // a new equation or monitor: take the history again
      return;
    }
    var added = false;
    if (r.res) added = append(r.res, s.iter, s.residuals) || added;
    r.mons.forEach(function (m, name) { added = append(m, s.iter, s.monitors) || added; });
    if (added) check.livePoints++;
  }

  function loadPlots(r) {
    return getJson('api/plots', { run: r.name }).then(function (p) {
      buildPlots(r, p);
      r.loaded = true;
      scheduleCheck();
    });
  }

  // --- timeline -----------------------------------------------------------------------------------------

  var SEV_MARK = { critical: '!!', warning: '!', info: '·' };

  // The table holds the run's MAX_EVENTS highest seqs, newest first, whatever order they come in (snapshot,
  // replay, live). Memory stays bounded: the seqs shown, and the highest seq that fell off the end (a seq at or
  // below it is older than every row and would fall off at once).
  function addEvent(r, ev) {
    var seq = num(ev.seq);
    if (!isFinite(seq) || r.seqs.has(seq) || seq <= r.floor) return false;
    r.seqs.add(seq);
    if (seq > r.maxSeq) r.maxSeq = seq;
    var tr = el('tr');
    tr.dataset.seq = String(seq);
    var sev = el('td', 'sev', SEV_MARK[ev.severity] || '·');
    sev.dataset.sev = ev.severity;
    sev.title = ev.severity;
    tr.appendChild(sev);
    tr.appendChild(el('td', 't', String(ev.at || '').replace('T', ' ').replace(/\.\d+Z$/, 'Z')));
    tr.appendChild(el('td', 't', ev.iter));
    var what = ev.type + ' ' + ev.state;
    var subject = ev.type === 'notice' ? [ev.channel, ev.pattern].filter(Boolean).join(' · ')
      : ev.type === 'action' ? (ev.method || ev.reason || '')
      : ev.type === 'run' ? (ev.reason || '') : (ev.pattern || '');
    tr.appendChild(el('td', null, what + (subject ? ' · ' + subject : '')));
    tr.appendChild(el('td', null, ev.summary || ev.error || ''));
    var quiet = r.events.querySelector('.quiet');
    if (quiet) quiet.remove();
    var next = r.events.firstChild;
    while (next && num(next.dataset.seq) > seq) next = next.nextSibling;
    r.events.insertBefore(tr, next);
    while (r.events.children.length > MAX_EVENTS) {
      var gone = num(r.events.lastChild.dataset.seq);
      r.seqs.delete(gone);
      if (gone > r.floor) r.floor = gone;
      r.events.removeChild(r.events.lastChild);
    }
    return true;
  }

  function loadEvents(r) {
    return getJson('api/events', { run: r.name, max: MAX_EVENTS }).then(function (list) {
      list.forEach(function (ev) { addEvent(r, ev); });
      r.eventsLoaded = true;
      if (r.events.children.length === 0) {
        var tr = el('tr', 'quiet');
        tr.appendChild(el('td', null, 'nothing on the timeline yet'));
        r.events.appendChild(tr);
      }
    });
  }

  function loadRun(status) {
    var r = ensureRun(status);
    return Promise.all([loadPlots(r), loadEvents(r)]);
  }

  // --- self-check: how many plots exist and whether their lines are drawn ---------------------------------

  var checkTimer = null;
  function scheduleCheck() {
    if (checkTimer !== null) return;
    checkTimer = setTimeout(function () { checkTimer = null; selfCheck(); }, 300);
  }

  function drawn(u) {
    var c = u.ctx.canvas;
    var b = u.bbox;
    if (!c.width || !c.height || b.width < 1 || b.height < 1) return 0;
    // read a copy of the plotting area, so the plot's own canvas stays tuned for drawing
    var w = Math.round(b.width);
    var h = Math.round(b.height);
    var copy = document.createElement('canvas');
    copy.width = w;
    copy.height = h;
    var cx = copy.getContext('2d', { willReadFrequently: true });
    cx.drawImage(c, Math.round(b.left), Math.round(b.top), w, h, 0, 0, w, h);
    var img = cx.getImageData(0, 0, w, h).data;
    var rgb = COLOURS.map(function (h) {
      return [parseInt(h.substr(1, 2), 16), parseInt(h.substr(3, 2), 16), parseInt(h.substr(5, 2), 16)];
    });
    var n = 0;
    for (var i = 0; i < img.length; i += 4) {
      if (img[i + 3] < 200) continue;
      for (var k = 0; k < rgb.length; k++) {
        if (Math.abs(img[i] - rgb[k][0]) + Math.abs(img[i + 1] - rgb[k][1]) + Math.abs(img[i + 2] - rgb[k][2]) < 30) {
          n++;
          break;
        }
      }
    }
    return n;
  }

  // pixels of a level line's colour along its row of the plot's canvas
  function levelPixels(u, level) {
    var c = u.ctx.canvas;
    var b = u.bbox;
    var w = Math.round(b.width);
    var y = Math.floor(level.y);
    if (!c.width || w < 1 || y < 0 || y >= c.height) return 0;
    var copy = document.createElement('canvas');
    copy.width = w;
    copy.height = 1;
    var cx = copy.getContext('2d', { willReadFrequently: true });
    cx.drawImage(c, Math.round(b.left), y, w, 1, 0, 0, w, 1);
    var img = cx.getImageData(0, 0, w, 1).data;
    var want = [parseInt(level.stroke.substr(1, 2), 16), parseInt(level.stroke.substr(3, 2), 16),
      parseInt(level.stroke.substr(5, 2), 16)];
    var n = 0;
    for (var i = 0; i < img.length; i += 4) {
      if (img[i + 3] >= 200 && Math.abs(img[i] - want[0]) + Math.abs(img[i + 1] - want[1])
        + Math.abs(img[i + 2] - want[2]) < 30) n++;
    }
    return n;
  }

  function selfCheck() {
    var canvases = 0;
    var nonBlank = 0;
    var levels = [];
    runs.forEach(function (r) {
      if (r.res) {
        r.res.levels.forEach(function (l) {
          levels.push({ run: r.name, label: l.label, value: l.value, pixels: levelPixels(r.res.plot, l) });
        });
      }
      var plots = [];
      if (r.res) plots.push(r.res.plot);
      r.mons.forEach(function (m) { plots.push(m.plot); });
      plots.forEach(function (u) {
        canvases++;
        if (drawn(u) > 10) nonBlank++;
      });
    });
    check.canvases = canvases;
    check.nonBlank = nonBlank;
    check.levels = levels;
    var out = document.getElementById('self-check');
    out.textContent = JSON.stringify(check);
    out.dataset.done = '1';
  }

  // --- the stream ---------------------------------------------------------------------------------------

  // What the page holds: the highest seq of each run's timeline. The server replays what came after it before
  // going live; a reconnect of the EventSource names its last event by the standard Last-Event-ID header.
  function seen() {
    var parts = [];
    runs.forEach(function (r) { parts.push(encodeURIComponent(r.name) + ':' + r.maxSeq); });
    return parts.join(',');
  }

  function connect() {
    var link = document.getElementById('link');
    var after = seen();
    var es = new EventSource(url('events', after ? { after: after } : {}));
    es.onopen = function () { link.dataset.state = 'open'; link.textContent = 'live'; };
    es.onerror = function () { link.dataset.state = 'lost'; link.textContent = 'reconnecting…'; };
    es.addEventListener('hello', function (m) {
      JSON.parse(m.data).forEach(function (s) {
        if (!runs.has(s.run)) loadRun(s).catch(report);
        else updateCard(runs.get(s.run), s);
      });
    });
    es.addEventListener('progress', function (m) {
      var s = JSON.parse(m.data);
      check.progress++;
      if (!runs.has(s.run)) { loadRun(s).catch(report); return; }
      var r = runs.get(s.run);
      updateCard(r, s);
      liveUpdate(r, s);
      scheduleCheck();
    });
    es.addEventListener('timeline', function (m) {
      var ev = JSON.parse(m.data);
      check.timeline++;
      var r = runs.get(ev.run);
      if (r) {
        var before = r.maxSeq;
        // seqs of a run go up by one: a gap means events the stream no longer held; take the run's recent ones
        if (addEvent(r, ev) && r.eventsLoaded && before > 0 && num(ev.seq) > before + 1) loadEvents(r).catch(report);
      }
      scheduleCheck();
    });
  }

  function report(e) { check.errors.push(String(e && e.message ? e.message : e)); scheduleCheck(); }

  getJson('api/runs').then(function (list) {
    if (list.length === 0) document.getElementById('empty').hidden = false;
    return Promise.all(list.map(loadRun));
  }).then(function () { selfCheck(); connect(); }).catch(function (e) { report(e); connect(); });
})();
