/* gtpack pages: draws the charts from their JSON options, fills the
   per-frequency charts from the embedded CSV, switches the beam in focus,
   filters and sorts tables. No network, no storage, no eval. */
(function () {
  'use strict';
  var charts = [];

  function esc(s) {
    return String(s).replace(/[&<>"']/g, function (c) {
      return { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' }[c];
    });
  }
  function num(v, d) {
    if (v === null || v === undefined || v === '' || isNaN(v)) { return '–'; }
    return (+v).toFixed(d);
  }

  // RFC 4180 CSV: quoted fields may hold commas, quotes and newlines.
  function parseCSV(text) {
    var rows = [], row = [], field = '', i = 0, q = false, c;
    for (; i < text.length; i++) {
      c = text[i];
      if (q) {
        if (c === '"') {
          if (text[i + 1] === '"') { field += '"'; i++; } else { q = false; }
        } else { field += c; }
      } else if (c === '"') { q = true; }
      else if (c === ',') { row.push(field); field = ''; }
      else if (c === '\n') { row.push(field); rows.push(row); row = []; field = ''; }
      else if (c !== '\r') { field += c; }
    }
    if (field !== '' || row.length) { row.push(field); rows.push(row); }
    return rows;
  }

  // The CSV is the download link's data URL; column 0 is Hz, shown in GHz.
  var csvRows = null;
  function csvData() {
    if (csvRows) { return csvRows; }
    csvRows = [];
    var a = document.getElementById('csv-link');
    if (!a) { return csvRows; }
    var href = a.getAttribute('href') || '';
    var cut = href.indexOf(',');
    if (cut < 0) { return csvRows; }
    var rows = parseCSV(decodeURIComponent(href.slice(cut + 1)));
    for (var r = 1; r < rows.length; r++) {
      var out = new Array(rows[r].length);
      for (var j = 0; j < rows[r].length; j++) {
        var s = rows[r][j];
        out[j] = s === '' ? null : (j === 0 ? +s / 1e9 : +s);
      }
      csvRows.push(out);
    }
    return csvRows;
  }

  function yOf(p) {
    var v = p.value;
    if (Array.isArray(v)) {
      var k = p.encode && p.encode.y ? p.encode.y[0] : 1;
      return v[k];
    }
    return v;
  }

  function axisTooltip(g, state) {
    var unit = g.unit || '';
    return function (ps) {
      if (!ps || !ps.length) { return ''; }
      var x = ps[0].axisValue, head;
      if (g.serials) {
        head = 'unit ' + esc(x) + ': ' + esc(g.serials[ps[0].dataIndex] || '');
      } else {
        head = esc(num(x, 4)) + ' GHz';
      }
      var lines = ['<b>' + head + '</b>'];
      // The beam in focus first, in bold; then the others in their order.
      var focusSeries = 'beam-' + state.focusId;
      ps = ps.slice().sort(function (a, b) {
        return (b.seriesId === focusSeries) - (a.seriesId === focusSeries) || a.seriesIndex - b.seriesIndex;
      });
      ps.forEach(function (p) {
        if (p.seriesId === 'band-lo') { return; }
        var y = yOf(p);
        if (p.seriesId === 'band-w') {
          var what = g.bandName ? g.bandName : 'U (k = 2) of ' + state.focusId;
          lines.push(p.marker + esc(what) + ': ±' + esc(num(y / 2, 3)) + ' dB');
          return;
        }
        var line = p.marker + esc(p.seriesName) + ': ' + esc(num(y, 3)) + ' ' + esc(unit);
        lines.push(p.seriesId === focusSeries ? '<b>' + line + '</b>' : line);
      });
      return lines.join('<br>');
    };
  }

  function itemTooltip(g) {
    return function (p) {
      var v = p.value || [];
      if (g.heat) {
        return 'row ' + esc(v[1] + (g.firstRow || 0)) + ', column ' + esc(v[0] + (g.firstCol || 0)) + ': ' + esc(num(v[2], 1)) + ' deg';
      }
      if (g.dates) {
        return '<b>' + esc(p.name || p.seriesName) + '</b><br>' + esc(p.seriesName) + ', ' + esc(String(v[0]).slice(0, 10)) + ': ' +
          esc(num(v[1], 3)) + ' ' + esc(g.unit || '');
      }
      if (g.categories) {
        return esc(g.categories[p.dataIndex] || p.name) + ': ' + esc(num(v[1] !== undefined ? v[1] : v, 3)) + ' ' + esc(g.unit || '');
      }
      return '<b>' + esc(p.name || p.seriesName) + '</b><br>' + esc(p.seriesName) + '<br>' +
        esc(num(v[0], 1)) + ' ' + esc(g.xunit || '') + ': ' + esc(num(v[1], 3)) + ' ' + esc(g.unit || '');
    };
  }

  function focus(chart, g, state, idx) {
    var fb = g.focus[idx];
    if (!fb) { return; }
    state.focusId = fb.id;
    var lo = [], w = [];
    csvData().forEach(function (r) {
      var y = r[fb.gt], u = r[fb.u];
      var ok = y !== null && u !== null && y !== undefined && u !== undefined;
      lo.push([r[0], ok ? y - u : null]);
      w.push([r[0], ok ? 2 * u : null]);
    });
    // The band above the dimmed beams (z 2) and below the beam in focus (z 5).
    var series = [{ id: 'band-lo', data: lo, z: 4 }, { id: 'band-w', data: w, z: 4 }];
    for (var i = 0; i < g.limitSeries; i++) {
      var l = fb.limits[i];
      series.push({ id: 'limit-' + i, name: l ? l.name : ' ', data: l ? l.data : [], showSymbol: !!(l && l.point), symbolSize: 10 });
    }
    g.focus.forEach(function (b) {
      var on = b.id === fb.id;
      series.push({ id: 'beam-' + b.id, z: on ? 5 : 2, lineStyle: { width: on ? 2.6 : 1, opacity: on ? 1 : 0.45 } });
    });
    chart.setOption({ series: series });
  }

  function draw(script) {
    var el = document.getElementById(script.getAttribute('data-for'));
    if (!el || typeof echarts === 'undefined') { return; }
    var opt = JSON.parse(script.textContent);
    var g = opt.gtpack || {};
    delete opt.gtpack;
    // No animation: a chart redrawn at the paper's width just before
    // printing must be complete when the page is captured.
    opt.animation = false;
    var state = { focusId: '' };
    if (g.csv) { opt.dataset = [{ source: csvData(), sourceHeader: false }]; }
    opt.tooltip = opt.tooltip || {};
    opt.tooltip.confine = true;
    opt.tooltip.formatter = opt.tooltip.trigger === 'axis' ? axisTooltip(g, state) : itemTooltip(g);
    var chart = echarts.init(el, null, { renderer: 'canvas' });
    chart.setOption(opt);
    if (g.focus) {
      focus(chart, g, state, g.focusDefault || 0);
      var sel = document.querySelector('select.focus[data-chart="' + el.id + '"]');
      if (sel) {
        sel.value = String(g.focusDefault || 0);
        sel.addEventListener('change', function () { focus(chart, g, state, +sel.value); });
      }
    }
    chart.gtpackHeat = !!g.heat;
    charts.push(chart);
  }

  function sortable(table) {
    var heads = table.querySelectorAll('th[data-sort]');
    Array.prototype.forEach.call(heads, function (th, col) {
      th.addEventListener('click', function () {
        var idx = Array.prototype.indexOf.call(th.parentNode.children, th);
        var asc = th.getAttribute('aria-sort') !== 'ascending';
        Array.prototype.forEach.call(heads, function (h) { h.removeAttribute('aria-sort'); });
        th.setAttribute('aria-sort', asc ? 'ascending' : 'descending');
        var body = table.tBodies[0];
        var rows = Array.prototype.slice.call(body.rows);
        var numeric = th.getAttribute('data-sort') === 'num';
        var key = function (tr) {
          var td = tr.cells[idx];
          var v = td ? (td.getAttribute('data-v') !== null ? td.getAttribute('data-v') : td.textContent) : '';
          if (numeric) { var n = parseFloat(v); return isNaN(n) ? Infinity : n; }
          return v.toLowerCase();
        };
        rows.map(function (tr, i) { return [key(tr), i, tr]; }).sort(function (a, b) {
          if (a[0] < b[0]) { return asc ? -1 : 1; }
          if (a[0] > b[0]) { return asc ? 1 : -1; }
          return a[1] - b[1];
        }).forEach(function (x) { body.appendChild(x[2]); });
      });
    });
  }

  function filterBox(input) {
    var table = document.getElementById(input.getAttribute('data-table'));
    var shown = document.getElementById(input.getAttribute('data-count'));
    if (!table) { return; }
    input.addEventListener('input', function () {
      var q = input.value.trim().toLowerCase(), n = 0;
      Array.prototype.forEach.call(table.tBodies[0].rows, function (tr) {
        var hit = !q || tr.textContent.toLowerCase().indexOf(q) >= 0;
        tr.hidden = !hit;
        if (hit) { n++; }
      });
      if (shown) { shown.textContent = String(n); }
    });
  }

  // For paper: no tooltip, no zoom slider, the printed size (the style
  // sheet's 6.8 cm high, 680 px wide: within the text width of A4 and
  // Letter alike).
  var printWidth = 680, printHeight = 257, printHeatHeight = 300;
  function resizeAll(width) {
    charts.forEach(function (c) {
      // A heat map redrawn for paper printed blank (its redraw is not done
      // when the page is captured): it keeps its drawing, zoomed down to
      // fit the printed width and 8 cm.
      if (c.gtpackHeat) {
        var inner = c.getDom().firstChild;
        var z = Math.min(1, width / c.getWidth(), printHeatHeight / c.getHeight());
        if (inner) { inner.style.zoom = width && z < 1 ? String(z) : ''; }
        if (width) { return; }
      }
      var zs = (c.getOption().dataZoom || []).map(function (z) {
        return z.type === 'slider' ? { show: !width } : {};
      });
      if (width) { c.dispatchAction({ type: 'hideTip' }); }
      if (zs.length) { c.setOption({ dataZoom: zs }); }
      c.resize(width ? { width: width, height: printHeight } : undefined);
      // Paint now: a page being printed may be captured before the next
      // animation frame, which would leave the drawing of the old size.
      c.getZr().flush();
    });
  }

  Array.prototype.forEach.call(document.querySelectorAll('script.chart-opt'), draw);
  Array.prototype.forEach.call(document.querySelectorAll('table.sortable'), sortable);
  Array.prototype.forEach.call(document.querySelectorAll('input.filter-box'), filterBox);
  var printMedia = window.matchMedia ? window.matchMedia('print') : null;
  function layout() { resizeAll(printMedia && printMedia.matches ? printWidth : 0); }
  window.addEventListener('resize', layout);
  if (printMedia && printMedia.addEventListener) { printMedia.addEventListener('change', layout); }
  // Paper is narrower than most screens: draw the charts at the printed
  // size while printing.
  window.addEventListener('beforeprint', function () { resizeAll(printWidth); });
  window.addEventListener('afterprint', function () { resizeAll(); });
  document.documentElement.setAttribute('data-charts', String(charts.length));
}());
