/* gtpack pages: draws the charts from their JSON options, fills the
   per-frequency charts from the embedded CSV, switches the beam in focus,
   filters, sorts and pages the overview's unit tables. No network, no storage, no eval. */
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
      if (g.yield) {
        return ['<b>' + esc(x) + '</b>'].concat(ps.map(function (p) {
          return p.marker + esc(p.seriesName) + ': ' + esc(p.seriesName === 'units' ? String(yOf(p)) : num(yOf(p), 1) + ' %');
        })).join('<br>');
      }
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
      if (g.unitRef) {
        var d = units(), u = d && v[2] >= 0 ? d.units[v[2]] : null;
        return '<b>' + esc(u ? u[0] : '') + '</b><br>' + esc(p.seriesName) + ', ' + esc(new Date(v[0]).toISOString().slice(0, 10)) + ': ' +
          esc(num(v[1], 3)) + ' ' + esc(g.unit || '');
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
    if (g.unitRef) {
      // A point opens its unit's report.
      chart.on('click', function (p) {
        var d = units(), v = p.value;
        if (d && Array.isArray(v) && v[2] >= 0 && d.units[v[2]]) { window.location.href = unitHref(d.units[v[2]][0]); }
      });
    }
    chart.gtpackHeat = !!g.heat;
    charts.push(chart);
  }

  // The overview's unit tables are drawn from the page's unit data (a JSON
  // block, see render/index.go): one page of rows at a time, so that
  // 10,000 units stay some hundred rows in the document; filtering and
  // sorting work on the data, not on the rows.
  var unitData;
  function units() {
    if (unitData === undefined) {
      var el = document.getElementById('unit-data');
      unitData = el ? JSON.parse(el.textContent) : null;
    }
    return unitData;
  }
  var verdictLabels = { 'pass': 'PASS', 'conditional-pass': 'CONDITIONAL PASS', 'conditional-fail': 'CONDITIONAL FAIL', 'fail': 'FAIL', 'incomplete': 'INCOMPLETE' };
  var verdictClasses = { 'pass': 'v-pass', 'conditional-pass': 'v-cpass', 'conditional-fail': 'v-cfail', 'fail': 'v-fail' };
  function vTag(v) {
    return '<span class="tag ' + (verdictClasses[v] || 'v-none') + '">' + esc(verdictLabels[v] || (v ? v.toUpperCase() : '–')) + '</span>';
  }
  function signed(v) {
    if (v === null || v === undefined || isNaN(v)) { return '–'; }
    var s = (+v).toFixed(2);
    if (/^-?0\.00$/.test(s)) { return '0.00'; }
    return v > 0 ? '+' + s : s;
  }
  function unitHref(serial, file) {
    var seg = encodeURIComponent(serial);
    return 'units/' + seg + '/' + (file === 'xlsx' ? seg + '.xlsx' : 'report.html');
  }

  // A query is words; a verdict word (pass, conditional-pass or
  // "conditional pass", conditional-fail, fail, incomplete) keeps the units
  // of exactly that verdict, "stale" the stale units, "retest" the units
  // with more than one run; every other word must occur in the unit's
  // serial, product, worst limit, date, report state or number (or, in the
  // needs-attention list, its reason).
  var verdictWords = { 'pass': 1, 'conditional-pass': 1, 'conditional-fail': 1, 'fail': 1, 'incomplete': 1 };
  function parseQuery(q) {
    var r = { verdicts: {}, nv: 0, stale: false, retest: false, words: [] };
    q.trim().toLowerCase().replace(/conditional[\s_]+(pass|fail)\b/g, 'conditional-$1').split(/\s+/).forEach(function (w) {
      if (!w) { return; }
      if (verdictWords[w]) { r.verdicts[w] = true; r.nv++; }
      else if (w === 'stale') { r.stale = true; }
      else if (w === 'retest' || w === 'retested') { r.retest = true; }
      else { r.words.push(w); }
    });
    return r;
  }

  var PAGE_ROWS = 100;
  function unitTable(table) {
    var d = units();
    if (!d) { return; }
    var U = d.units, view = table.getAttribute('data-view'), why = null;
    var base = [];
    if (view === 'attention') {
      why = {};
      d.attention.forEach(function (a) { base.push(a[0]); why[a[0]] = a[1]; });
    } else {
      for (var i = 0; i < U.length; i++) { base.push(i); }
    }
    var pos = {};
    base.forEach(function (u, k) { pos[u] = k; });
    var text = {};
    base.forEach(function (i) {
      var u = U[i];
      text[i] = [u[0], d.products[u[1]], u[4] >= 0 ? d.limits[u[4]] : '', u[5], u[8], u[9], why ? why[i] : ''].join('\u0001').toLowerCase();
    });
    var keys = {
      serial: function (u) { return u[0]; },
      product: function (u) { return d.products[u[1]]; },
      // Severity: the verdicts list starts fail, conditional fail,
      // incomplete, conditional pass, pass; any other ranks with incomplete.
      verdict: function (u) { return u[2] < 5 ? u[2] : 2.5; },
      margin: function (u) { return u[3] === null ? Infinity : u[3]; },
      limit: function (u) { return u[4] >= 0 ? d.limits[u[4]] : ''; },
      started: function (u) { return u[5]; },
      issue: function (u) { return (u[8] + ' ' + u[9]).toLowerCase(); },
      runs: function (u) { return u[6]; },
      why: function (u, i) { return why ? why[i] : ''; }
    };
    var order = base.slice(), shown = order, page = 0, query = parseQuery('');
    var tbody = table.tBodies[0];
    var pager = document.querySelector('.pager[data-table="' + table.id + '"]');
    var input = document.querySelector('input.filter-box[data-table="' + table.id + '"]');
    var counter = input ? document.getElementById(input.getAttribute('data-count')) : null;

    function hit(i) {
      var u = U[i], q = query;
      if (q.nv && !q.verdicts[d.verdicts[u[2]]]) { return false; }
      if (q.stale && !u[11]) { return false; }
      if (q.retest && !(u[6] > 1)) { return false; }
      for (var k = 0; k < q.words.length; k++) {
        if (text[i].indexOf(q.words[k]) < 0) { return false; }
      }
      return true;
    }
    function row(i) {
      var u = U[i], v = d.verdicts[u[2]], h = [];
      var serial = u[11] || u[10] ? esc(u[0]) : '<a href="' + esc(unitHref(u[0])) + '">' + esc(u[0]) + '</a>';
      h.push('<td class="nowrap">' + serial + '</td><td>' + esc(d.products[u[1]]) + '</td>');
      var vc = vTag(v);
      if (u[11]) { vc += ' <span class="tag stale" title="' + esc(u[11]) + '">stale</span><div class="hint stale-why">' + esc(u[11]) + '</div>'; }
      h.push('<td>' + vc + '</td>');
      if (why) {
        h.push('<td class="why">' + esc(why[i]) + '</td><td class="nowrap">' + esc(String(u[5]).slice(0, 10)) + '</td>');
      } else {
        h.push('<td class="num">' + signed(u[3]) + '</td><td>' + esc(u[4] >= 0 ? d.limits[u[4]] : '') + '</td><td class="nowrap">' + esc(String(u[5]).slice(0, 10)) + '</td>');
        if (d.issue) {
          var st = u[8] ? '<span class="tag issue-' + esc(u[8]) + '">' + esc(u[8]) + '</span>' + (u[9] ? '<div class="hint">' + esc(u[9]) + '</div>' : '') : '–';
          var runs = u[6] ? String(u[6]) : '–';
          if (u[6] > 1) {
            runs += ' <span class="tag retest" title="retested: first run ' + esc(u[7] >= 0 ? (verdictLabels[d.verdicts[u[7]]] || d.verdicts[u[7]]) : '–') + '">retest</span>';
          }
          h.push('<td>' + st + '</td><td class="num">' + runs + '</td>');
        }
      }
      if (u[10]) {
        h.push(why ? '<td>none</td>' : '<td>none</td><td>none</td>');
      } else {
        h.push('<td><a href="' + esc(unitHref(u[0])) + '">report</a></td>');
        if (!why) { h.push('<td><a href="' + esc(unitHref(u[0], 'xlsx')) + '">xlsx</a></td>'); }
      }
      return '<tr data-serial="' + esc(u[0]) + '">' + h.join('') + '</tr>';
    }
    function draw() {
      var pages = Math.max(1, Math.ceil(shown.length / PAGE_ROWS));
      if (page >= pages) { page = pages - 1; }
      var from = page * PAGE_ROWS, to = Math.min(shown.length, from + PAGE_ROWS), h = [];
      for (var k = from; k < to; k++) { h.push(row(shown[k])); }
      if (!h.length) {
        h.push('<tr><td colspan="' + table.tHead.rows[0].cells.length + '">No unit' + (base.length ? ' matches.' : '.') + '</td></tr>');
      }
      tbody.innerHTML = h.join('');
      if (counter) { counter.textContent = String(shown.length); }
      if (pager) {
        pager.innerHTML = shown.length <= PAGE_ROWS ? '' :
          '<button type="button" data-go="-1"' + (page ? '' : ' disabled') + '>‹ previous</button> ' +
          '<span>rows ' + (from + 1) + '–' + to + ' of ' + shown.length + ' (page ' + (page + 1) + ' of ' + pages + ')</span> ' +
          '<button type="button" data-go="1"' + (page < pages - 1 ? '' : ' disabled') + '>next ›</button>';
      }
    }
    function refilter() {
      shown = query.nv || query.stale || query.retest || query.words.length ? order.filter(hit) : order;
      page = 0;
      draw();
    }
    if (pager) {
      pager.addEventListener('click', function (e) {
        var b = e.target.closest ? e.target.closest('button[data-go]') : null;
        if (b) { page += +b.getAttribute('data-go'); draw(); }
      });
    }
    if (input) {
      input.addEventListener('input', function () { query = parseQuery(input.value); refilter(); });
    }
    var heads = table.querySelectorAll('th[data-key]');
    Array.prototype.forEach.call(heads, function (th) {
      th.addEventListener('click', function () {
        var key = keys[th.getAttribute('data-key')];
        var asc = th.getAttribute('aria-sort') !== 'ascending';
        Array.prototype.forEach.call(heads, function (x) { x.removeAttribute('aria-sort'); });
        th.setAttribute('aria-sort', asc ? 'ascending' : 'descending');
        var kv = {};
        base.forEach(function (i) { kv[i] = key(U[i], i); });
        var dir = asc ? 1 : -1;
        order = base.slice().sort(function (a, b) {
          var x = kv[a], y = kv[b];
          if (x < y) { return -dir; }
          if (x > y) { return dir; }
          return pos[a] - pos[b];
        });
        refilter();
      });
    });
    draw();
  }

  // A verdict count in the header filters the unit table to that verdict.
  function countButtons() {
    var input = document.querySelector('input.filter-box[data-table="unit-table"]');
    Array.prototype.forEach.call(document.querySelectorAll('button.count[data-verdict]'), function (b) {
      b.addEventListener('click', function () {
        if (!input) { return; }
        input.value = b.getAttribute('data-verdict');
        input.dispatchEvent(new Event('input'));
        var t = document.getElementById('units');
        if (t && t.scrollIntoView) { t.scrollIntoView(); }
      });
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
  Array.prototype.forEach.call(document.querySelectorAll('table.vtable'), unitTable);
  countButtons();
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
