/* watcher morning review: draws the plots from the data block, then checks itself. */
(function () {
  "use strict";
  var check = { charts: 0, failed: 0, canvases: 0, nonBlank: 0, seriesDrawn: 0, markers: 0, actions: 0, bands: 0,
    predicted: 0, levels: 0, nonFinite: 0, errors: [] };
  window.addEventListener("error", function (e) { check.errors.push(String(e.message || e)); });
  var consoleError = console.error;
  console.error = function () {
    check.errors.push(Array.prototype.map.call(arguments, String).join(" "));
    return consoleError.apply(console, arguments);
  };
  var SEV = { critical: "#D55E00", warning: "#B07800", info: "#0072B2" };
  var data = JSON.parse(document.getElementById("report-data").textContent);

  function exp(v) {
    if (v == null) { return ""; }
    var e = Math.round(Math.log10(v));
    return Math.abs(v - Math.pow(10, e)) / v < 1e-6 ? "1e" + e : v.toExponential(0);
  }

  function count(v) {
    if (v == null) { return ""; }
    var a = Math.abs(v);
    if (a >= 1e6) { return +(v / 1e6).toFixed(2) + "M"; }
    if (a >= 1e4) { return +(v / 1e3).toFixed(1) + "k"; }
    return String(v);
  }

  function decades(u, splits) {
    return splits.map(function (v) {
      if (v == null || v <= 0) { return null; }
      var e = Math.log10(v);
      return Math.abs(e - Math.round(e)) < 1e-9 ? v : null;
    });
  }

  function shape(ctx, kind, x, y, r) {
    ctx.beginPath();
    if (kind === "critical") {           // downward triangle
      ctx.moveTo(x - r, y - r); ctx.lineTo(x + r, y - r); ctx.lineTo(x, y + r);
    } else if (kind === "warning") {     // diamond
      ctx.moveTo(x, y - r); ctx.lineTo(x + r, y); ctx.lineTo(x, y + r); ctx.lineTo(x - r, y);
    } else {                             // square
      ctx.rect(x - r * 0.8, y - r * 0.8, r * 1.6, r * 1.6);
    }
    ctx.closePath();
  }

  function overlays(u, c) {
    var ctx = u.ctx, b = u.bbox, px = devicePixelRatio || 1;
    var left = b.left, right = b.left + b.width, top = b.top, bottom = b.top + b.height;
    function X(v) { return v == null ? right : Math.max(left, Math.min(right, u.valToPos(v, "x", true))); }
    function Y(v) { return u.valToPos(v, "y", true); }
    ctx.save();
    ctx.beginPath(); ctx.rect(left, top - 14 * px, b.width, b.height + 14 * px); ctx.clip();
    ctx.font = (10 * px) + "px sans-serif";
    var ymin = u.scales.y.min, ymax = u.scales.y.max;
    (c.levels || []).forEach(function (l) {
      if (l < ymin || l > ymax) { return; }
      var y = Y(l);
      ctx.strokeStyle = "#777"; ctx.lineWidth = px; ctx.setLineDash([6 * px, 4 * px]);
      ctx.beginPath(); ctx.moveTo(left, y); ctx.lineTo(right, y); ctx.stroke(); ctx.setLineDash([]);
      ctx.fillStyle = "#444"; ctx.textAlign = "right"; ctx.textBaseline = "bottom";
      ctx.fillText(exp(l), right - 3 * px, y - 2 * px);
      check.levels++;
    });
    (c.settled || []).forEach(function (s) {
      var x0 = X(s.x0), x1 = X(s.x1), y0 = Y(s.hi), y1 = Y(s.lo);
      ctx.fillStyle = "rgba(0,114,178,0.10)"; ctx.fillRect(x0, y0, x1 - x0, Math.max(y1 - y0, px));
      ctx.strokeStyle = "rgba(0,114,178,0.55)"; ctx.lineWidth = px;
      ctx.save(); ctx.beginPath(); ctx.rect(x0, y0, x1 - x0, Math.max(y1 - y0, px)); ctx.clip();
      for (var h = x0 - (y1 - y0); h < x1; h += 8 * px) {   // hatching, so the band survives grey print
        ctx.beginPath(); ctx.moveTo(h, y1); ctx.lineTo(h + (y1 - y0), y0); ctx.stroke();
      }
      ctx.restore();
      ctx.strokeStyle = "#0072B2"; ctx.beginPath(); ctx.moveTo(x0, y0); ctx.lineTo(x1, y0);
      ctx.moveTo(x0, y1); ctx.lineTo(x1, y1); ctx.stroke();
      check.bands++;
    });
    if (c.predicted != null) {
      var yp = Y(c.predicted);
      ctx.strokeStyle = "#000"; ctx.lineWidth = 1.5 * px; ctx.setLineDash([10 * px, 4 * px, 2 * px, 4 * px]);
      ctx.beginPath(); ctx.moveTo(left, yp); ctx.lineTo(right, yp); ctx.stroke(); ctx.setLineDash([]);
      ctx.fillStyle = "#000"; shape(ctx, "warning", right - 6 * px, yp, 5 * px); ctx.fill();
      ctx.textAlign = "right"; ctx.textBaseline = "bottom";
      ctx.fillText(c.predictedLabel, right - 14 * px, yp - 4 * px);
      check.predicted++;
    }
    var lastLabel = -1e9, lanes = [];
    (c.spans || []).forEach(function (s) {
      var col = SEV[s.sev] || SEV.info, x0 = X(s.x0), x1 = X(s.x1);
      // a faint tint over the plot (overlapping conditions stay readable), and a bar in its own lane
      ctx.globalAlpha = 0.05; ctx.fillStyle = col;
      ctx.fillRect(x0, top, Math.max(x1 - x0, px), b.height); ctx.globalAlpha = 1;
      var lane = 0;
      while (lanes[lane] != null && lanes[lane] > x0 - 2 * px) { lane++; }
      lanes[lane] = x1;
      var ly = top + 16 * px + (lane % 8) * 6 * px;
      ctx.globalAlpha = 0.75; ctx.fillStyle = col;
      ctx.fillRect(x0, ly, Math.max(x1 - x0, 2 * px), 4 * px); ctx.globalAlpha = 1;
      ctx.strokeStyle = col; ctx.lineWidth = px; ctx.setLineDash([3 * px, 3 * px]);
      ctx.beginPath(); ctx.moveTo(x0, top); ctx.lineTo(x0, bottom); ctx.stroke(); ctx.setLineDash([]);
      shape(ctx, s.sev, x0, top + 7 * px, 6 * px); ctx.fillStyle = col; ctx.fill();
      ctx.strokeStyle = "#fff"; ctx.stroke();
      check.markers++;
      if (s.x1 != null) {
        ctx.beginPath(); ctx.arc(x1, top + 7 * px, 5 * px, 0, 2 * Math.PI);
        ctx.fillStyle = "#fff"; ctx.fill(); ctx.strokeStyle = col; ctx.lineWidth = 2 * px; ctx.stroke();
        check.markers++;
      }
      if (x0 - lastLabel > 34 * px) {
        ctx.fillStyle = "#111"; ctx.textAlign = "left"; ctx.textBaseline = "top";
        ctx.fillText("#" + s.n, x0 + 8 * px, top + 2 * px);
        lastLabel = x0;
      }
    });
    (c.actions || []).forEach(function (a) {
      var x = X(a.x);
      ctx.strokeStyle = "#7a3d9a"; ctx.lineWidth = 2 * px;
      ctx.beginPath(); ctx.moveTo(x, top); ctx.lineTo(x, bottom); ctx.stroke();
      ctx.fillStyle = "#7a3d9a"; ctx.fillRect(x - 5 * px, bottom - 10 * px, 10 * px, 10 * px);
      ctx.textAlign = "right"; ctx.textBaseline = "bottom"; ctx.font = "bold " + (10 * px) + "px sans-serif";
      ctx.fillText("\u25a0 " + a.label + " #" + a.n, x - 7 * px, bottom - 2 * px);
      ctx.font = (10 * px) + "px sans-serif";
      check.actions++;
    });
    (c.series || []).forEach(function (s) {
      (s.nf || []).forEach(function (xv) {
        var x = X(xv);
        ctx.fillStyle = "#D55E00"; ctx.textAlign = "center"; ctx.textBaseline = "top";
        ctx.font = "bold " + (12 * px) + "px sans-serif"; ctx.fillText("\u2715", x, top + 16 * px);
        check.nonFinite++;
      });
    });
    ctx.restore();
  }

  function range(c) {
    var extra = [];
    (c.settled || []).forEach(function (s) { extra.push(s.lo, s.hi); });
    if (c.predicted != null) { extra.push(c.predicted); }
    return function (u, min, max) {
      extra.forEach(function (v) { if (min == null || v < min) { min = v; } if (max == null || v > max) { max = v; } });
      if (min == null) { return [0, 1]; }
      var pad = (max - min) * 0.08 || Math.abs(max) * 0.01 || 1;
      return [min - pad, max + pad];
    };
  }

  function build(c) {
    var el = document.getElementById(c.id);
    var width = Math.max(480, Math.min(1200, el.clientWidth || 900));
    var height = el.parentNode.classList.contains("short") ? 220 : 340;
    var series = [{ label: c.xLabel }];
    var cols = [c.x];
    c.series.forEach(function (s) {
      series.push({ label: s.label, stroke: s.color, width: s.width, dash: s.dash, spanGaps: true,
        points: { show: false } });
      cols.push(s.y);
    });
    var bands = (c.bands || []).map(function (b) { return { series: [b.upper, b.lower], fill: b.fill }; });
    var yAxis = { label: c.yLabel, stroke: "#222", size: 64, grid: { stroke: "#e6e6e6", width: 1 },
      ticks: { stroke: "#bbb" } };
    if (c.log) {
      yAxis.values = function (u, vals) { return vals.map(exp); };
      yAxis.ticks.filter = decades;
      yAxis.grid.filter = decades;
    }
    var opts = {
      width: width, height: height,
      scales: { x: { time: false }, y: c.log ? { distr: 3, log: 10 } : { range: range(c) } },
      series: series,
      bands: bands,
      axes: [{ label: c.xLabel, stroke: "#222", space: 70, grid: { stroke: "#e6e6e6", width: 1 },
        ticks: { stroke: "#bbb" }, values: function (u, vals) { return vals.map(count); } },
        yAxis],
      legend: { show: false },
      cursor: { drag: { x: true, y: false } },
      hooks: {
        draw: [function (u) { overlays(u, c); }],
        drawSeries: [function () { check.seriesDrawn++; }]
      }
    };
    new uPlot(opts, cols, el);
    check.charts++;
  }

  (data.charts || []).forEach(function (c) {
    try { build(c); } catch (e) { check.failed++; check.errors.push(c.id + ": " + e); }
  });

  function selfCheck() {
    var canvases = document.querySelectorAll(".canvas canvas");
    check.canvases = canvases.length;
    check.nonBlank = 0;
    canvases.forEach(function (cv) {
      try {
        var px = cv.getContext("2d").getImageData(0, 0, cv.width, cv.height).data;
        for (var i = 3; i < px.length; i += 4) { if (px[i] !== 0) { check.nonBlank++; return; } }
      } catch (e) { check.errors.push("canvas: " + e); }
    });
    var out = document.getElementById("self-check");
    out.textContent = JSON.stringify(check);
    out.setAttribute("data-done", "1");
  }
  setTimeout(selfCheck, 200);
})();
