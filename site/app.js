// Tracewright page: talks to the engine in a Web Worker through a small versioned message API
// (DEVELOPERS.md, "Message API"). It never makes a network request; files are read by the
// engine from the File handle the browser gives, and nothing is written to storage.
(() => {
  'use strict';
  const API = 1;
  const $ = (id) => document.getElementById(id);
  const el = (tag, attrs, ...kids) => {
    const e = document.createElement(tag);
    for (const [k, v] of Object.entries(attrs || {})) {
      if (k === 'class') e.className = v; else if (k === 'text') e.textContent = v; else e.setAttribute(k, v);
    }
    for (const kid of kids) if (kid != null) e.append(kid);
    return e;
  };
  const fmtInt = (n) => Number(n).toLocaleString('en-US');
  const sections = ['start', 'mapping', 'progress', 'problem', 'overview', 'flowmap', 'model', 'conformance', 'timing', 'forecast'];
  const views = ['overview', 'flowmap', 'model', 'conformance', 'timing', 'forecast'];
  function show(name) {
    for (const s of sections) $(s).hidden = s !== name;
    document.body.dataset.state = name;
    $('views').hidden = !views.includes(name);
    for (const b of $('views').querySelectorAll('.tab')) b.setAttribute('aria-selected', String(b.dataset.view === name));
    const h = $(name).querySelector('h2');
    if (h) { h.tabIndex = -1; h.focus({ preventScroll: true }); }
  }

  // ---- engine ----
  let worker = null;
  let nextId = 1;
  const pending = new Map();
  let readyResolve;
  const ready = new Promise((r) => { readyResolve = r; });

  function startEngine() {
    const src = $('tw-worker').textContent;
    const url = URL.createObjectURL(new Blob([src], { type: 'text/javascript' }));
    worker = new Worker(url);
    URL.revokeObjectURL(url);
    worker.onmessage = (e) => {
      const m = e.data;
      const payload = m.json ? JSON.parse(m.json) : null;
      if (m.kind === 'ready') {
        $('engine-state').textContent = 'ready';
        document.body.dataset.engine = 'ready';
        readyResolve(payload);
        return;
      }
      if (m.id === 0 && m.kind === 'error') { fail(payload); return; }
      const p = pending.get(m.id);
      if (!p) return;
      if (m.kind === 'progress') { if (p.onProgress) p.onProgress(payload); return; }
      pending.delete(m.id);
      if (m.kind === 'error') p.reject(payload); else p.resolve(payload);
    };
    worker.onerror = (e) => fail({ message: 'The engine stopped: ' + (e.message || 'unknown error') });
    worker.postMessage({ kind: 'boot', engine: $('tw-engine').textContent });
  }

  async function call(kind, payload, file, onProgress) {
    await ready;
    const id = nextId++;
    const msg = { v: API, id, kind, payload: payload == null ? '' : JSON.stringify(payload) };
    if (file) msg.file = file;
    return { id, done: new Promise((resolve, reject) => { pending.set(id, { resolve, reject, onProgress }); worker.postMessage(msg); }) };
  }

  // ---- start screen ----
  let current = null; // { file, sniff }
  const drop = $('dropzone');
  drop.addEventListener('click', () => $('file-input').click());
  drop.addEventListener('keydown', (e) => { if (e.key === 'Enter' || e.key === ' ') { e.preventDefault(); $('file-input').click(); } });
  drop.addEventListener('dragover', (e) => { e.preventDefault(); drop.classList.add('over'); });
  drop.addEventListener('dragleave', () => drop.classList.remove('over'));
  drop.addEventListener('drop', (e) => {
    e.preventDefault(); drop.classList.remove('over');
    if (e.dataTransfer.files.length) openFile(e.dataTransfer.files[0]);
  });
  // A file dropped anywhere else must not make the browser navigate away to it.
  window.addEventListener('dragover', (e) => e.preventDefault());
  window.addEventListener('drop', (e) => e.preventDefault());
  $('file-input').addEventListener('change', (e) => { if (e.target.files.length) openFile(e.target.files[0]); e.target.value = ''; });
  function demoFile() {
    const node = $('tw-demo');
    const text = node.textContent.trim();
    let bytes;
    if (typeof Uint8Array.fromBase64 === 'function') bytes = Uint8Array.fromBase64(text);
    else { const bin = atob(text); bytes = new Uint8Array(bin.length); for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i); }
    return new File([bytes], node.dataset.name);
  }
  $('demo-button').addEventListener('click', () => openFile(demoFile()));
  // Warm the engine up on the demo log while the user picks a file (see warm_up in
  // core/engine): the browser compiles the engine's hot code well only after it has run.
  ready.then(() => call('warm_up', null, demoFile())).catch(() => {});
  for (const id of ['back-button', 'problem-back', 'again-button']) $(id).addEventListener('click', () => show('start'));

  async function openFile(file) {
    try {
      const { done } = await call('sniff', null, file);
      const sniff = await done;
      current = { file, sniff };
      if (sniff.format === 'xes') { load({}); return; }
      showMapping(sniff);
    } catch (err) { fail(err); }
  }

  // ---- column mapping ----
  const roles = [['case', 'case id'], ['activity', 'activity'], ['time', 'time (end)'], ['start', 'start time'],
    ['resource', 'resource'], ['lifecycle', 'lifecycle'], ['attribute', 'keep as attribute'], ['ignore', 'leave out']];
  function confidenceWord(c) { return c >= 0.9 ? 'sure' : c >= 0.6 ? 'likely' : 'a guess'; }

  function showMapping(sniff) {
    const csv = sniff.csv;
    $('sep').value = csv.separator === '\t' ? 'tab' : csv.separator;
    $('has-header').checked = csv.header;
    $('time-format').value = csv.time_format || '';
    const amb = $('time-ambiguous');
    amb.hidden = !csv.time_ambiguous;
    if (csv.time_ambiguous) {
      amb.textContent = 'The sample cannot tell whether dates are written day first or month first. Day first (' + csv.time_format +
        ') is assumed; for month first use ' + csv.time_alternative + '.';
    }
    const table = $('preview');
    table.replaceChildren(table.querySelector('caption'));
    const head = el('tr');
    csv.guesses.forEach((g, i) => {
      const sel = el('select', { 'aria-label': 'Role of column ' + g.column, 'data-col': String(i) });
      for (const [v, label] of roles) sel.append(el('option', { value: v, text: label }));
      sel.value = g.role;
      sel.addEventListener('change', checkTimes);
      head.append(el('th', { scope: 'col', class: 'role' }, el('span', { text: g.column }), sel,
        el('span', { class: 'sure', text: confidenceWord(g.confidence) + ' (' + Math.round(g.confidence * 100) + '%)', title: g.why })));
    });
    table.append(el('thead', {}, head));
    const body = el('tbody');
    for (const row of csv.preview || []) body.append(el('tr', {}, ...row.map((c) => el('td', { text: c }))));
    table.append(body);
    show('mapping');
    checkTimes();
  }

  function chosenMapping() {
    const m = { ignore: [] };
    const cols = current.sniff.csv.columns;
    for (const sel of $('preview').querySelectorAll('select')) {
      const name = cols[Number(sel.dataset.col)];
      if (sel.value === 'ignore') m.ignore.push(name);
      else if (sel.value !== 'attribute') m[sel.value] = name;
    }
    return m;
  }

  let checkSeq = 0;
  async function checkTimes() {
    const seq = ++checkSeq;
    const out = $('time-check');
    const csv = current.sniff.csv;
    const m = chosenMapping();
    const j = csv.columns.indexOf(m.time);
    const layout = $('time-format').value.trim();
    if (j < 0) { out.textContent = 'Choose the column that holds the time.'; out.className = 'small bad'; return; }
    const values = (csv.preview || []).map((r) => r[j]).filter((v) => v && v.trim()).slice(0, 5);
    if (!layout || !values.length) { out.textContent = ''; return; }
    try {
      const { done } = await call('parse_time', { layout, values });
      const res = await done;
      if (seq !== checkSeq) return;
      const bad = res.filter((r) => r.error);
      out.className = bad.length ? 'small bad' : 'small';
      out.textContent = bad.length ? bad.length + ' of ' + res.length + ' sample values do not match, for example "' + bad[0].value + '".'
        : '"' + res[0].value + '" reads as ' + res[0].parsed.replace('T', ' ').replace('Z', ' UTC') + '.';
    } catch (err) {
      if (seq !== checkSeq) return;
      out.className = 'small bad'; out.textContent = err.message;
    }
  }
  $('time-format').addEventListener('input', checkTimes);
  // A new separator or header changes every column: look at the start of the file again.
  async function resniff() {
    try {
      const { done } = await call('sniff', { separator: $('sep').value, header: $('has-header').checked ? 'yes' : 'no' }, current.file);
      current.sniff = await done;
      showMapping(current.sniff);
    } catch (err) { fail(err); }
  }
  $('sep').addEventListener('change', resniff);
  $('has-header').addEventListener('change', resniff);
  $('read-button').addEventListener('click', () => load(null));

  // ---- reading ----
  let running = null;
  async function load(options) {
    const opts = options || {
      mapping: chosenMapping(),
      time_format: $('time-format').value.trim(),
      separator: $('sep').value,
      header: $('has-header').checked ? 'yes' : 'no',
      skip_bad_rows: document.querySelector('input[name=onerror]:checked').value === 'skip',
    };
    const file = current.file;
    $('progress-name').textContent = file.name;
    $('progress-bar').value = 0;
    $('progress-text').textContent = 'Starting…';
    $('overview').dataset.ready = 'false';
    show('progress');
    const started = performance.now();
    try {
      const job = await call('load', opts, file, (p) => {
        const total = p.total || file.size;
        if (total) $('progress-bar').value = Math.min(1, p.bytes / total);
        $('progress-text').textContent = fmtInt(p.events) + ' events read, ' + (p.bytes / 1048576).toFixed(1) + ' of ' + (total / 1048576).toFixed(1) + ' MB';
      });
      running = job.id;
      const res = await job.done;
      running = null;
      renderOverview(res, performance.now() - started);
    } catch (err) {
      running = null;
      if (err && err.cause === 'cancelled') { show(current.sniff.format === 'csv' ? 'mapping' : 'start'); return; }
      fail(err);
    }
  }
  $('cancel-button').addEventListener('click', () => { if (running) call('cancel', { id: running }); });

  function fail(err) {
    const e = err || {};
    $('problem-message').textContent = e.message || String(err);
    const where = $('problem-where');
    where.replaceChildren();
    const add = (k, v) => { if (v !== undefined && v !== null && v !== '' && v !== 0) where.append(el('dt', { text: k }), el('dd', { text: String(v) })); };
    add('Line', e.line); add('Column', e.column); add('Position in the line', e.offset); add('Text found', e.value);
    show('problem');
  }

  // ---- overview ----
  function duration(s) {
    if (s >= 86400) return (s / 86400).toFixed(s >= 864000 ? 0 : 1) + ' d';
    if (s >= 3600) return (s / 3600).toFixed(1) + ' h';
    if (s >= 60) return Math.round(s / 60) + ' min';
    return Math.round(s) + ' s';
  }

  function renderOverview(res, ms) {
    const o = res.overview;
    $('overview-name').textContent = res.name;
    const figs = $('figures');
    figs.replaceChildren();
    const figure = (metric, label, value) => figs.append(el('div', { class: 'figure', 'data-metric': metric, 'data-value': String(value) },
      el('span', { class: 'value', text: fmtInt(value) }), el('span', { class: 'label', text: label })));
    figure('cases', 'cases', o.cases);
    figure('events', 'events', o.events);
    figure('activities', 'activities', o.activities);
    figure('variants', 'variants', o.variants);
    figure('resources', 'resources', o.resources);
    if (o.activity_instances !== o.events) figure('activity_instances', 'activity instances (start and end paired)', o.activity_instances);
    $('span').textContent = o.first ? 'From ' + o.first.replace('T', ' ').replace('Z', ' UTC') + ' to ' + o.last.replace('T', ' ').replace('Z', ' UTC') +
      ' (' + duration(o.span_seconds) + '). Read in ' + (ms / 1000).toFixed(1) + ' s.' : 'The log has no timestamps.';
    const notes = $('read-notes');
    notes.replaceChildren();
    for (const w of res.read.warnings || []) notes.append(el('p', { class: 'notice', text: w }));
    const pr = res.read.problems;
    if (pr && pr.skipped) {
      const list = el('ul');
      for (const f of pr.first || []) list.append(el('li', { text: f.message }));
      notes.append(el('div', { class: 'notice' }, el('p', { text: fmtInt(pr.skipped) + ' rows could not be read and were set aside. The first ones:' }), list));
    }
    const d = o.case_duration_seconds;
    $('dur-summary').textContent = d.n ? 'Median ' + duration(d.median) + ', mean ' + duration(d.mean) + '; 90% of cases within ' + duration(d.p90) + ', the longest ' + duration(d.max) + '.' : '';
    drawHistogram(o.case_duration_histogram || []);
    const paths = $('paths');
    paths.replaceChildren();
    for (const v of o.top_variants) {
      paths.append(el('li', {}, el('span', { class: 'share', text: (v.share * 100).toFixed(1) + '%' }),
        el('span', { class: 'muted small', text: fmtInt(v.cases) + ' cases ' }), el('br'),
        ...v.activities.map((a) => el('span', { class: 'chip', text: a }))));
    }
    $('paths-summary').textContent = 'The ' + o.top_variants.length + ' most common of ' + fmtInt(o.variants) + ' paths cover ' + (o.top_variants_share * 100).toFixed(0) + '% of cases.';
    const t = $('activities');
    const paired = o.activity_instances !== o.events; // start and end events were paired
    const num = (text) => el('th', { scope: 'col', class: 'num', text });
    t.replaceChildren(el('thead', {}, el('tr', {}, el('th', { scope: 'col', text: 'Activity' }), paired ? num('Times done') : null,
      num('Events'), num('Cases'), num('Share of cases'))));
    const tb = el('tbody');
    for (const a of o.activity_counts) {
      tb.append(el('tr', {}, el('td', { text: a.name }), paired ? el('td', { class: 'num', text: fmtInt(a.instances) }) : null,
        el('td', { class: 'num', text: fmtInt(a.events) }), el('td', { class: 'num', text: fmtInt(a.cases) }),
        el('td', { class: 'num', text: (100 * a.cases / o.cases).toFixed(1) + '%' })));
    }
    t.append(tb);
    show('overview');
    $('overview').dataset.ready = 'true';
  }

  const SVG = 'http://www.w3.org/2000/svg';
  function svg(tag, attrs, text) {
    const e = document.createElementNS(SVG, tag);
    for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, String(v));
    if (text != null) e.textContent = text;
    return e;
  }
  function drawHistogram(bins) { drawBars($('histogram'), [{ bins, cls: 'hbar', unit: 'cases' }]); }
  // drawBars draws one or more series over the same bins side by side; with several series each
  // bar is its series' share, so groups of different sizes compare.
  function drawBars(box, series) {
    box.replaceChildren();
    const bins = series[0].bins || [];
    if (!bins.length) return;
    const W = 480, H = 200, L = 44, B = 34, T = 8;
    const share = series.length > 1;
    const val = (s, b) => share ? b.count / Math.max(1, s.bins.reduce((a, x) => a + x.count, 0)) : b.count;
    const maxC = Math.max(...series.flatMap((s) => s.bins.map((b) => val(s, b))));
    const s = svg('svg', { viewBox: '0 0 ' + W + ' ' + H, width: '100%', role: 'img', 'aria-label': 'Histogram of case durations, ' + bins.length + ' bars' + (share ? ' per group' : '') });
    const bw = (W - L - 8) / bins.length;
    series.forEach((sr, k) => {
      const w = bw / series.length;
      sr.bins.forEach((b, i) => {
        const h = maxC ? (H - B - T) * val(sr, b) / maxC : 0;
        const r = svg('rect', { class: sr.cls, x: L + i * bw + k * w + 1, y: H - B - h, width: Math.max(1, w - 2), height: h });
        r.append(svg('title', {}, duration(b.lo) + ' to ' + duration(b.hi) + ': ' + fmtInt(b.count) + ' ' + sr.unit + (share ? ' (' + (100 * val(sr, b)).toFixed(1) + '%)' : '')));
        s.append(r);
      });
    });
    s.append(svg('text', { x: L, y: H - B + 14 }, duration(bins[0].lo)));
    s.append(svg('text', { x: W - 8, y: H - B + 14, 'text-anchor': 'end' }, duration(bins[bins.length - 1].hi)));
    s.append(svg('text', { x: (L + W) / 2, y: H - 4, 'text-anchor': 'middle' }, 'case duration'));
    s.append(svg('text', { x: L - 6, y: T + 10, 'text-anchor': 'end' }, share ? (100 * maxC).toFixed(0) + '%' : fmtInt(maxC)));
    s.append(svg('text', { x: L - 6, y: H - B, 'text-anchor': 'end' }, '0'));
    s.append(svg('line', { x1: L, y1: H - B, x2: W - 8, y2: H - B, stroke: 'currentColor', 'stroke-opacity': 0.3 }));
    box.append(s);
  }

  // ---- views of a loaded log ----
  for (const b of $('views').querySelectorAll('.tab')) {
    b.setAttribute('role', 'tab');
    b.addEventListener('click', () => {
      show(b.dataset.view);
      if (b.dataset.view === 'flowmap') drawFlowMap();
      if (b.dataset.view === 'model') drawModel();
      if (b.dataset.view === 'forecast' && !forecast) runForecast();
      if (b.dataset.view === 'conformance' && !conf) runConformance();
      if (b.dataset.view === 'timing') { if (conf) renderTiming(); else runConformance(); }
    });
  }
  $('views').setAttribute('role', 'tablist');

  function placeSVG(box, text) {
    const doc = new DOMParser().parseFromString(text, 'image/svg+xml');
    box.replaceChildren(document.importNode(doc.documentElement, true));
  }
  function download(name, type, text) {
    const a = el('a', { download: name });
    a.href = URL.createObjectURL(new Blob([text], { type }));
    document.body.append(a);
    a.click();
    a.remove();
    setTimeout(() => URL.revokeObjectURL(a.href), 1000);
  }
  function savePNG(box, name) {
    const svgEl = box.querySelector('svg');
    if (!svgEl) return;
    const text = new XMLSerializer().serializeToString(svgEl);
    const url = URL.createObjectURL(new Blob([text], { type: 'image/svg+xml' }));
    const img = new Image();
    img.onload = () => {
      const c = document.createElement('canvas');
      c.width = img.width * 2; c.height = img.height * 2;
      const g = c.getContext('2d');
      g.fillStyle = '#ffffff'; g.fillRect(0, 0, c.width, c.height);
      g.scale(2, 2); g.drawImage(img, 0, 0);
      URL.revokeObjectURL(url);
      c.toBlob((blob) => {
        const a = el('a', { download: name });
        a.href = URL.createObjectURL(blob);
        document.body.append(a); a.click(); a.remove();
      }, 'image/png');
    };
    img.src = url;
  }

  let flow = null;
  let flowSeq = 0;
  async function drawFlowMap() {
    const seq = ++flowSeq;
    const opts = { activities: $('fm-acts').value / 100, edges: $('fm-edges').value / 100,
      durations: document.querySelector('input[name=fm-mode]:checked').value === 'durations' };
    $('fm-acts-out').textContent = $('fm-acts').value + '%';
    $('fm-edges-out').textContent = $('fm-edges').value + '%';
    try {
      const { done } = await call('flow_map', opts);
      const res = await done;
      if (seq !== flowSeq) return;
      flow = res;
      placeSVG($('fm-canvas'), res.svg);
      const g = res.graph;
      $('fm-note').textContent = (g.nodes.length - 2) + ' activities and ' + g.edges.length + ' paths shown' +
        (g.hidden_activities ? '; ' + g.hidden_activities + ' rarer activities hidden' : '') +
        (g.hidden_edges ? '; ' + g.hidden_edges + ' rarer paths hidden' : '') + '. Every activity shown can be reached from the start and leads to the end.';
      $('fm-canvas').dataset.ready = 'true';
    } catch (err) { fail(err); }
  }
  for (const id of ['fm-acts', 'fm-edges']) $(id).addEventListener('input', drawFlowMap);
  for (const r of document.querySelectorAll('input[name=fm-mode]')) r.addEventListener('change', drawFlowMap);
  function detail(rows, title) {
    const dl = el('dl');
    for (const [k, v] of rows) dl.append(el('dt', { text: k }), el('dd', { text: v }));
    $('fm-detail').replaceChildren(el('h3', { text: title }), dl);
  }
  async function caseList(query, heading) {
    try {
      const { done } = await call('flow_detail', Object.assign({ activities: $('fm-acts').value / 100 }, query));
      const cases = await done;
      if (!cases.length) return;
      const list = el('ol', { class: 'small' });
      for (const c of cases) list.append(el('li', { text: c.case + (c.seconds ? ' (' + duration(c.seconds) + ')' : '') }));
      $('fm-detail').append(el('p', { class: 'small muted', text: heading }), list);
    } catch (err) { /* the figures above stand on their own */ }
  }
  function showDetail(target) {
    if (!flow) return;
    const node = target.closest('.node');
    const edge = target.closest('.edge');
    const g = flow.graph;
    if (node) {
      const n = g.nodes[Number(node.dataset.id)];
      detail([['done', fmtInt(n.count) + ' times'], ['in cases', fmtInt(n.cases)]], n.name);
      if (n.activity >= 0) caseList({ node: n.activity }, 'Cases where it took longest:');
    } else if (edge) {
      const from = Number(edge.dataset.from), to = Number(edge.dataset.to);
      const e = g.edges.find((x) => x.from === from && x.to === to);
      if (!e) return;
      const d = e.duration_seconds;
      const rows = [['taken', fmtInt(e.count) + ' times'], ['in cases', fmtInt(e.cases)]];
      if (d.n) rows.push(['median wait', duration(d.median)], ['mean wait', duration(d.mean)], ['90% within', duration(d.p90)], ['longest', duration(d.max)]);
      detail(rows, g.nodes[from].name + ' → ' + g.nodes[to].name);
      caseList({ from: g.nodes[from].activity, to: g.nodes[to].activity }, 'Cases that waited longest here:');
    }
  }
  $('fm-canvas').addEventListener('click', (e) => showDetail(e.target));
  $('fm-canvas').addEventListener('keydown', (e) => { if (e.key === 'Enter') showDetail(e.target); });
  $('fm-svg').addEventListener('click', () => { if (flow) download('flow-map.svg', 'image/svg+xml', flow.svg); });
  $('fm-png').addEventListener('click', () => savePNG($('fm-canvas'), 'flow-map.png'));

  let model = null;
  let modelSeq = 0;
  async function drawModel() {
    const seq = ++modelSeq;
    const method = $('md-method').value;
    $('md-noise').disabled = method === 'alpha';
    $('md-noise-out').textContent = $('md-noise').value + '%';
    $('md-variants-out').textContent = $('md-variants').value + '%';
    $('md-summary').textContent = 'Finding the model…';
    try {
      const { done } = await call('model', { method, noise: method === 'alpha' ? 0 : $('md-noise').value / 100, variants: $('md-variants').value / 100 });
      const res = await done;
      if (seq !== modelSeq) return;
      model = res;
      placeModel();
      $('md-summary').textContent = res.places + ' places, ' + res.transitions + ' transitions; ' +
        (res.sound ? 'sound: every run can finish properly.' : 'not sound: some runs cannot finish properly.') + (res.tree ? ' As a process tree: ' + res.tree : '');
      $('md-bpmn').disabled = !res.bpmn;
      $('md-note').hidden = !res.note;
      $('md-note').textContent = res.note || '';
      $('md-canvas').dataset.ready = 'true';
    } catch (err) { fail(err); }
  }
  function placeModel() {
    if (!model) return;
    const asTree = document.querySelector('input[name=md-draw]:checked').value === 'tree' && model.tree_svg;
    placeSVG($('md-canvas'), asTree ? model.tree_svg : model.svg);
  }
  for (const r of document.querySelectorAll('input[name=md-draw]')) r.addEventListener('change', placeModel);
  $('md-method').addEventListener('change', drawModel);
  $('md-noise').addEventListener('change', drawModel);
  $('md-noise').addEventListener('input', () => { $('md-noise-out').textContent = $('md-noise').value + '%'; });
  $('md-variants').addEventListener('change', drawModel);
  $('md-variants').addEventListener('input', () => { $('md-variants-out').textContent = $('md-variants').value + '%'; });
  $('md-pnml').addEventListener('click', () => { if (model) download('model.pnml', 'application/xml', model.pnml); });
  $('md-dot').addEventListener('click', () => { if (model) download('model.dot', 'text/vnd.graphviz', model.dot); });
  $('md-svg').addEventListener('click', () => { if (model) download('model.svg', 'image/svg+xml', model.svg); });
  $('md-bpmn').addEventListener('click', () => { if (model && model.bpmn) download('model.bpmn', 'application/xml', model.bpmn); });

  let conf = null;
  let pnmlFile = null;
  $('cf-file').addEventListener('change', (e) => {
    if (e.target.files.length) { pnmlFile = e.target.files[0]; document.querySelector('input[name=cf-source][value=pnml]').checked = true; runConformance(); }
    e.target.value = '';
  });
  let confRunning = 0;
  async function runConformance() {
    const source = document.querySelector('input[name=cf-source]:checked').value;
    if (source === 'pnml' && !pnmlFile) { $('cf-model').textContent = 'Choose a PNML file first.'; return; }
    if (confRunning) return;
    $('conformance').dataset.ready = 'false';
    $('timing').dataset.ready = 'false';
    $('cf-model').textContent = 'Setting every path against the model…';
    const progress = (p) => { $('cf-model').textContent = 'Setting every path against the model… ' + fmtInt(p.variants_done) + ' of ' + fmtInt(p.variants) + ' paths.'; };
    try {
      const { id, done } = await call('conformance', { source, noise: $('md-noise').value / 100, variants: $('md-variants').value / 100, costs: readCosts() }, source === 'pnml' ? pnmlFile : null, progress);
      confRunning = id;
      $('cf-stop').hidden = false;
      conf = await done;
      renderConformance();
      if (!$('timing').hidden) renderTiming();
    } catch (err) {
      $('cf-model').textContent = err && err.cause === 'cancelled' ? 'Stopped before every path was set against the model; the figures below, if any, are from the last complete check.' : '';
      if (!(err && err.cause === 'cancelled')) $('cf-figures').replaceChildren(el('p', { class: 'bad', text: err.message || String(err) }));
    } finally {
      confRunning = 0;
      $('cf-stop').hidden = true;
    }
  }
  $('cf-stop').addEventListener('click', () => { if (confRunning) call('cancel', { id: confRunning }); });
  $('cf-run').addEventListener('click', runConformance);
  // readCosts collects the weights the user changed in the departures table (1 is the default
  // and is not sent).
  function readCosts() {
    const costs = { log: {}, model: {} };
    for (const inp of $('cf-acts').querySelectorAll('input[data-kind]')) {
      const v = Number(inp.value);
      if (inp.value !== '' && Number.isInteger(v) && v >= 0 && v <= 1000 && v !== 1) costs[inp.dataset.kind][inp.dataset.activity] = v;
    }
    return costs;
  }
  async function saveCases(which) {
    try {
      const { done } = await call('conformance_cases', { which });
      const res = await done;
      download(which + '-cases.csv', 'text/csv', res.csv);
    } catch (err) { $('cf-notes').append(el('p', { class: 'bad', text: err.message || String(err) })); }
  }
  $('cf-save-fit').addEventListener('click', () => saveCases('fitting'));
  $('cf-save-dev').addEventListener('click', () => saveCases('deviating'));
  function renderConformance() {
    const c = conf, a = c.alignment;
    $('cf-model').textContent = 'Reference model: ' + c.model + '.' + (c.running_cases_left_out ? ' ' + fmtInt(c.running_cases_left_out) + ' cases still running are left out: their missing ends are not deviations.' : '');
    const figs = $('cf-figures');
    figs.replaceChildren();
    const fig = (metric, value, text, label) => figs.append(el('div', { class: 'figure', 'data-metric': metric, 'data-value': String(value) },
      el('span', { class: 'value', text }), el('span', { class: 'label', text: label })));
    fig('fitness', a.fitness, a.fitness.toFixed(3), 'fitness: how much of the log the model explains (1 is all)');
    fig('precision', a.precision, a.precision.toFixed(3), 'precision: how little the model allows beyond the log (1 is nothing)');
    fig('fitting_share', a.fitting_cases / a.cases, pct(a.fitting_cases / a.cases), 'of cases follow the model exactly');
    fig('token_replay', c.token_replay_fitness, c.token_replay_fitness.toFixed(3), 'fitness by token replay');
    const notes = $('cf-notes');
    notes.replaceChildren();
    if (a.variants_not_aligned) notes.append(el('p', { class: 'notice', text: a.variants_not_aligned + ' paths were too costly to set against the model within the bound and are left out of the figures.' }));
    if (c.unmatched.activities.length) notes.append(el('p', { class: 'notice', text: 'Activities the model does not know: ' + c.unmatched.activities.join(', ') + '.' }));
    if (c.unmatched.labels.length) notes.append(el('p', { class: 'notice', text: 'Model steps the log never shows: ' + c.unmatched.labels.join(', ') + '.' }));
    const t = $('cf-acts');
    const old = readCosts();
    t.replaceChildren(el('thead', {}, el('tr', {}, el('th', { scope: 'col', text: 'Activity' }), el('th', { scope: 'col', class: 'num', text: 'As allowed' }),
      el('th', { scope: 'col', class: 'num', text: 'Not allowed there' }), el('th', { scope: 'col', class: 'num', text: 'Skipped' }),
      el('th', { scope: 'col', class: 'num', text: 'Weight if added' }), el('th', { scope: 'col', class: 'num', text: 'Weight if skipped' }))));
    const tb = el('tbody');
    const weight = (kind, a) => el('input', { type: 'number', min: '0', max: '1000', step: '1', class: 'weight', 'data-kind': kind, 'data-activity': a,
      value: String(old[kind][a] ?? 1), 'aria-label': (kind === 'log' ? 'Weight of doing ' : 'Weight of skipping ') + a });
    for (const d of c.activities) {
      tb.append(el('tr', {}, el('td', { text: d.activity }), el('td', { class: 'num', text: fmtInt(d.sync) }), el('td', { class: 'num', text: fmtInt(d.log_moves) }), el('td', { class: 'num', text: fmtInt(d.model_moves) }),
        el('td', { class: 'num' }, weight('log', d.activity)), el('td', { class: 'num' }, weight('model', d.activity))));
    }
    t.append(tb);
    placeSVG($('cf-canvas'), c.svg);
    $('cf-save').hidden = false;
    const pathItem = (v) => {
      const chips = [];
      for (const m of v.moves) {
        if (m.silent) continue;
        const cls = m.kind === 'sync' ? 'chip' : m.kind === 'log' ? 'chip mv-log' : 'chip mv-model';
        const title = m.kind === 'sync' ? 'as the model allows' : m.kind === 'log' ? 'done, but the model does not allow it here' : 'required by the model, skipped';
        chips.push(el('span', { class: cls, text: m.activity, title }));
      }
      const more = v.cases > v.case_examples.length ? ', …' : '';
      return el('li', {}, el('span', { class: 'share', text: fmtInt(v.cases) + (v.cases === 1 ? ' case' : ' cases') }),
        el('span', { class: 'muted small', text: v.cost ? 'departure cost ' + v.cost : 'fits' }), el('br'), ...chips,
        el('div', { class: 'muted small', text: 'Cases: ' + v.case_examples.join(', ') + more }));
    };
    const pats = $('cf-pats');
    pats.replaceChildren();
    for (const p of c.patterns.slice(0, 12)) {
      const what = p.kind === 'log' ? 'Done where not allowed: ' : 'Skipped where required: ';
      const ol = el('ol', { class: 'paths' });
      const vs = p.variants.map((i) => a.variants[i]).sort((x, y) => y.cases - x.cases);
      for (const v of vs.slice(0, 8)) ol.append(pathItem(v));
      if (vs.length > 8) ol.append(el('li', { class: 'muted small', text: 'and ' + (vs.length - 8) + ' more paths' }));
      pats.append(el('details', { class: 'pattern' }, el('summary', {}, el('span', { class: 'share', text: fmtInt(p.cases) + (p.cases === 1 ? ' case' : ' cases') }),
        what + p.activity + (vs.length > 1 ? ' (' + vs.length + ' paths)' : '')), ol));
    }
    if (!c.patterns.length) pats.append(el('p', { class: 'muted', text: 'No case departs from the model.' }));
    const list = $('cf-vars');
    list.replaceChildren();
    for (const v of a.variants.filter((x) => x.aligned).sort((x, y) => y.cases - x.cases).slice(0, 15)) list.append(pathItem(v));
    $('conformance').dataset.ready = 'true';
  }

  $('tm-flow').addEventListener('click', () => {
    document.querySelector('input[name=fm-mode][value=durations]').checked = true;
    document.querySelector('#views [data-view="flowmap"]').click();
  });
  function renderTiming() {
    const tm = conf.timing;
    const figs = $('tm-figures');
    figs.replaceChildren();
    const fig = (metric, value, text, label) => figs.append(el('div', { class: 'figure', 'data-metric': metric, 'data-value': String(value) },
      el('span', { class: 'value', text }), el('span', { class: 'label', text: label })));
    fig('fitting_median', tm.fitting_case_seconds.median, tm.fitting_case_seconds.n ? duration(tm.fitting_case_seconds.median) : '–', 'median duration of the ' + fmtInt(tm.fitting_case_seconds.n) + ' cases that follow the model');
    fig('deviating_median', tm.deviating_case_seconds.median, tm.deviating_case_seconds.n ? duration(tm.deviating_case_seconds.median) : '–', 'median duration of the ' + fmtInt(tm.deviating_case_seconds.n) + ' cases that depart from it');
    const key = tm.has_start ? 'waiting_seconds' : 'sojourn_seconds';
    $('tm-how').textContent = (tm.has_start
      ? 'The log records when steps start, so waiting (from the moment the model allows a step to its start) and work (start to completion) are told apart. '
      : 'The log records only completions, so each step\'s time runs from the moment the model allows it to its completion, waiting and work together. ') +
      'Reference model: ' + conf.model + '.' + (tm.cases_untimed ? ' ' + fmtInt(tm.cases_untimed) + ' cases without timestamps are left out.' : '');
    placeSVG($('tm-canvas'), conf.timing_svg);
    const steps = tm.transitions.filter((x) => x[key].n).sort((a, b) => b[key].median - a[key].median);
    const head = el('tr', {}, el('th', { scope: 'col', text: 'Step' }), el('th', { scope: 'col', class: 'num', text: 'Times' }),
      el('th', { scope: 'col', class: 'num', text: tm.has_start ? 'Median wait' : 'Median time' }), el('th', { scope: 'col', class: 'num', text: tm.has_start ? 'Mean wait' : 'Mean time' }),
      el('th', { scope: 'col', class: 'num', text: '90% within' }), tm.has_start ? el('th', { scope: 'col', class: 'num', text: 'Median work' }) : null);
    const body = el('tbody');
    for (const x of steps) {
      const d = x[key];
      body.append(el('tr', {}, el('td', { text: x.activity }), el('td', { class: 'num', text: fmtInt(d.n) }), el('td', { class: 'num', text: duration(d.median) }),
        el('td', { class: 'num', text: duration(d.mean) }), el('td', { class: 'num', text: duration(d.p90) }), tm.has_start ? el('td', { class: 'num', text: duration(x.service_seconds.median) }) : null));
    }
    $('tm-steps').replaceChildren(el('thead', {}, head), body);
    drawBars($('tm-hist'), [{ bins: tm.fitting_case_histogram || [], cls: 'hbar fit', unit: 'fitting cases' }, { bins: tm.deviating_case_histogram || [], cls: 'hbar dev', unit: 'deviating cases' }]);
    $('timing').dataset.ready = 'true';
  }

  let forecast = null;
  const FC_PAGE = 100; // open cases listed at a time
  let fcShown = FC_PAGE;
  let fcRunning = 0;
  $('fc-stop').addEventListener('click', () => { if (fcRunning) call('cancel', { id: fcRunning }); });
  async function runForecast() {
    const kind = $('fc-outcome-kind').value;
    let arg = $('fc-outcome-arg').value.trim();
    if (kind === 'longer' && arg && !/[a-z]$/.test(arg)) arg += 'd';
    const ends = [...$('fc-ends').querySelectorAll('input:checked')].map((i) => i.value);
    const opts = { abstraction: $('fc-abs').value, horizon: Number($('fc-horizon').value), kfold: 5,
      outcome: kind && arg ? kind + ':' + arg : '', export_date: $('fc-export').value, end_activities: ends, attribute: $('fc-attr').value };
    if (fcRunning) return;
    const status = el('p', { class: 'muted', text: 'Measuring on past cases…' });
    $('fc-eval').replaceChildren(status);
    const progress = (p) => { status.textContent = 'Measuring on past cases… ' + fmtInt(p.models_done) + ' of ' + fmtInt(p.models) + ' models fitted.'; };
    try {
      const { id, done } = await call('forecast', opts, null, progress);
      fcRunning = id;
      $('fc-stop').hidden = false;
      forecast = await done;
      fcShown = FC_PAGE;
      renderForecast();
    } catch (err) {
      const stopped = err && err.cause === 'cancelled';
      $('fc-eval').replaceChildren(el('p', { class: stopped ? 'muted' : 'bad', text: stopped ? 'Stopped; nothing was forecast.' : err.message || String(err) }));
    } finally {
      fcRunning = 0;
      $('fc-stop').hidden = true;
    }
  }
  $('fc-run').addEventListener('click', runForecast);
  $('fc-sort').addEventListener('change', () => { if (forecast) { fcShown = FC_PAGE; renderList(); } });
  $('fc-more').addEventListener('click', () => { fcShown += FC_PAGE; renderList(); });
  const pct = (x) => (100 * x).toFixed(1) + '%';
  function renderEnds(f) {
    const box = $('fc-ends');
    if (box.querySelector('input')) return; // the user's choice stays
    for (const a of f.activities) {
      const cb = el('input', { type: 'checkbox', value: a });
      cb.checked = f.end_activities.includes(a);
      box.append(el('label', {}, cb, ' ' + a));
    }
  }
  function renderAttrs(f) {
    const sel = $('fc-attr');
    if (sel.options.length > 2) return;
    for (const a of f.case_attributes) sel.append(el('option', { value: a, text: 'cases by ' + a }));
  }
  // showCase fills the detail of one open case: the forecast with its basis and past error, the
  // next steps, and the case's events so far (fetched from the engine).
  async function showCase(r) {
    const f = forecast, fc = r.forecast, box = $('fc-detail');
    const row = (k, v) => [el('dt', { text: k }), el('dd', { text: v })];
    const past = (f.evaluation.by_prefix_length || []).find((x) => x.events === Math.min(r.events, 20));
    const basis = !fc.fallback ? 'past moments in the same state' : fc.horizon > 0
      ? 'past moments with the same last ' + fc.horizon + ' steps (no past case was in this exact state)'
      : 'past moments of any kind (no past case was in a similar state)';
    const dl = el('dl', {}, ...row('Steps so far', r.events + ', the last ' + r.last_activity + ' on ' + r.last_event.slice(0, 10)),
      ...row('Expected finish', r.expected_finish.slice(0, 10) + ' (in ' + duration(fc.median_seconds) + '; on average ' + duration(fc.mean_seconds) + ')'),
      ...row('80% range', r.finish_low.slice(0, 10) + ' to ' + r.finish_high.slice(0, 10)),
      ...row('Based on', fmtInt(fc.support) + ' ' + basis),
      ...(past ? row('Past error at ' + past.events + (past.events === 20 ? '+' : '') + ' steps', past.mae_days.toFixed(2) + ' days on average; ' + pct(past.coverage) + ' fell inside the range') : []),
      ...(f.outcome ? row('Chance: ' + f.outcome, pct(fc.outcome_probability)) : []));
    const next = Object.entries(fc.next).concat([['(finish)', fc.end_probability]]).filter(([, p]) => p > 0).sort((a, b) => b[1] - a[1]);
    const bars = el('ul', { class: 'bars' });
    for (const [a, p] of next) {
      const bar = el('span', { class: 'bar' });
      bar.style.setProperty('--w', (100 * p).toFixed(1) + '%'); // through CSSOM: the policy forbids style attributes
      bars.append(el('li', {}, el('span', { class: 'bar-label', text: a }), bar, el('span', { class: 'num', text: pct(p) })));
    }
    const events = el('tbody');
    box.replaceChildren(el('h4', { id: 'fc-detail-title', text: 'Case ' + r.case }), dl, el('h5', { text: 'What may come next' }), bars,
      el('h5', { text: 'Events so far' }), el('div', { class: 'table-wrap' }, el('table', {}, el('thead', {}, el('tr', {}, el('th', { text: 'Time (UTC)' }), el('th', { text: 'Activity' }), el('th', { text: 'Lifecycle' }))), events)));
    box.hidden = false;
    box.scrollIntoView({ block: 'nearest' });
    try {
      const { done } = await call('case_events', { case: r.case });
      const ce = await done;
      for (const e of ce.events) events.append(el('tr', {}, el('td', { text: e.time ? e.time.replace('T', ' ').replace('Z', '') : '(no time)' }), el('td', { text: e.activity }), el('td', { text: e.lifecycle || '' })));
      box.dataset.ready = 'true';
    } catch (err) { events.append(el('tr', {}, el('td', { class: 'bad', text: err.message || String(err) }))); }
  }
  function renderForecast() {
    const f = forecast, ev = f.evaluation;
    renderEnds(f);
    renderAttrs(f);
    $('fc-detail').hidden = true;
    const figs = el('div', { class: 'figures' });
    const fig = (metric, label, value) => figs.append(el('div', { class: 'figure', 'data-metric': metric, 'data-value': String(value) },
      el('span', { class: 'value', text: label[0] }), el('span', { class: 'label', text: label[1] })));
    fig('mae_days', [ev.mae_days.toFixed(2) + ' d', 'typical error of the remaining time'], ev.mae_days);
    fig('baseline_mae_days', [ev.baseline_mae_days.toFixed(2) + ' d', 'error of a plain average by number of steps'], ev.baseline_mae_days);
    const covRange = ev.coverage_range && ev.coverage_range[1] > 0 ? ' (measured on other past cases, likely ' + pct(ev.coverage_range[0]) + ' to ' + pct(ev.coverage_range[1]) + ')' : '';
    fig('coverage', [pct(ev.coverage), 'of past cases fell inside the ' + pct(ev.interval_level).replace('.0', '') + ' range' + covRange], ev.coverage);
    fig('next_accuracy', [pct(ev.next_accuracy), 'next activity guessed right'], ev.next_accuracy);
    if (f.outcome) fig('auc', [ev.auc.toFixed(2), 'how well the chance of "' + f.outcome + '" ranks cases (AUC; 0.5 is a coin)'], ev.auc);
    const rows = el('tbody');
    for (const r of ev.by_prefix_length || []) {
      rows.append(el('tr', {}, el('td', { class: 'num', text: String(r.events) + (r.events === 20 ? '+' : '') }), el('td', { class: 'num', text: fmtInt(r.prefixes) }),
        el('td', { class: 'num', text: r.mae_days.toFixed(2) }), el('td', { class: 'num', text: r.baseline_mae_days.toFixed(2) }), el('td', { class: 'num', text: pct(r.coverage) })));
    }
    const byLen = el('details', {}, el('summary', { text: 'Error by number of steps so far' }),
      el('div', { class: 'table-wrap' }, el('table', {}, el('thead', {}, el('tr', {}, el('th', { class: 'num', text: 'Steps' }), el('th', { class: 'num', text: 'Moments tested' }),
        el('th', { class: 'num', text: 'Error (d)' }), el('th', { class: 'num', text: 'Plain average (d)' }), el('th', { class: 'num', text: 'Inside the range' }))), rows)));
    const over = (c) => c.abstraction + ' over ' + (c.horizon ? 'the last ' + c.horizon + ' activities' : 'the whole case so far');
    const chosen = f.search.states ? ' The states were chosen by measurement: ' + over(f.config) + '.' : '';
    const refined = f.config.attribute ? ' States also tell cases apart by ' + f.config.attribute + (f.search.attribute ? ', which lowered the error on past cases.' : '.')
      : f.search.attribute ? ' No case attribute lowered the error on past cases, so none tells cases apart.' : '';
    const tried = el('tbody');
    for (const c of f.choices || []) {
      const used = c.config.abstraction === f.config.abstraction && c.config.horizon === f.config.horizon && (c.config.attribute || '') === (f.config.attribute || '');
      tried.append(el('tr', {}, el('td', { text: over(c.config) }), el('td', { text: c.config.attribute || '(nothing)' }),
        el('td', { class: 'num', text: c.mae_days.toFixed(2) }), el('td', { text: used ? 'yes' : '' })));
    }
    const choices = f.choices ? el('details', {}, el('summary', { text: 'Settings compared on past cases (3 folds)' }),
      el('div', { class: 'table-wrap' }, el('table', {}, el('thead', {}, el('tr', {}, el('th', { text: 'States' }), el('th', { text: 'Told apart by' }),
        el('th', { class: 'num', text: 'Error (d)' }), el('th', { text: 'Kept' }))), tried))) : null;
    const cuts = (ev.cut_dates || [ev.cut_date]).map((d) => d.slice(0, 10));
    const tested = cuts.length > 1
      ? ' Tested at ' + cuts.length + ' past dates (' + cuts.join(', ') + '): each time trained on the cases that had ended by then (' + fmtInt(ev.train_cases) + ' on average)'
      : ' Trained on ' + fmtInt(ev.train_cases) + ' cases that ended before ' + cuts[0];
    const ratio = ev.mae_ratio_to_baseline ? ' The error is ' + ev.mae_ratio_to_baseline.toFixed(2) + ' times the plain average\'s' +
      (ev.mae_ratio_range && ev.mae_ratio_range[1] > 0 ? ' (likely ' + ev.mae_ratio_range[0].toFixed(2) + ' to ' + ev.mae_ratio_range[1].toFixed(2) + ' on other past cases).' : '.') : '';
    const how = el('p', { class: 'muted small', text: chosen + refined + tested +
      ', tested on ' + fmtInt(ev.test_prefixes) + ' moments of ' + fmtInt(ev.test_cases) + ' cases that were open then.' + ratio +
      (f.kfold ? ' Across 5 folds of ' + (f.kfold_cases < f.completed_cases ? 'an even sample of ' + fmtInt(f.kfold_cases) + ' finished cases' : 'all finished cases') + ': error ' + f.kfold.mae_days.toFixed(2) + ' d, ' + pct(f.kfold.coverage) + ' inside the range.' : '') +
      ' A case is finished when it reaches ' + f.end_activities.join(', ') + '; one silent for more than ' + f.inactive_after_days.toFixed(0) + ' days counts as abandoned (' + fmtInt(f.abandoned_cases) + ').' });
    $('fc-eval').replaceChildren(figs, how, byLen, ...(choices ? [choices] : []));
    renderList();
    $('fc-list-wrap').hidden = false;
    $('forecast').dataset.ready = 'true';
  }
  // renderList fills the table of open cases in the chosen order, FC_PAGE rows at a time: a large
  // log has thousands, and the CSV holds them all.
  function renderList() {
    const f = forecast;
    const t = $('fc-list');
    const head = el('tr', {}, el('th', { scope: 'col', text: 'Case' }), el('th', { scope: 'col', text: 'Last activity' }), el('th', { scope: 'col', text: 'Expected finish' }),
      el('th', { scope: 'col', text: 'Likely between' }), el('th', { scope: 'col', text: 'Most likely next' }), f.outcome ? el('th', { scope: 'col', class: 'num', text: 'Chance: ' + f.outcome }) : null);
    const body = el('tbody');
    const order = $('fc-sort').value;
    const running = [...f.running];
    if (order === 'late') running.sort((a, b) => (a.finish_high < b.finish_high ? 1 : -1));
    if (order === 'risk') running.sort((a, b) => b.forecast.outcome_probability - a.forecast.outcome_probability);
    const shown = running.slice(0, fcShown);
    for (const r of shown) {
      const fc = r.forecast;
      let next = 'finish', best = fc.end_probability;
      for (const [a, p] of Object.entries(fc.next)) if (p > best) { best = p; next = a; }
      const note = fc.fallback ? ' (from the last ' + (fc.horizon > 0 ? fc.horizon + ' steps' : 'nothing') + ': this path is new)' : '';
      const pick = el('button', { type: 'button', class: 'linkish', text: r.case, 'aria-label': 'Detail of case ' + r.case });
      pick.addEventListener('click', () => showCase(r));
      body.append(el('tr', {}, el('td', {}, pick), el('td', { text: r.last_activity }), el('td', { text: r.expected_finish.slice(0, 10) + note }),
        el('td', { text: r.finish_low.slice(0, 10) + ' to ' + r.finish_high.slice(0, 10) }), el('td', { text: next + ' (' + pct(best) + ')' }),
        f.outcome ? el('td', { class: 'num', text: pct(fc.outcome_probability) }) : null));
    }
    t.replaceChildren(el('thead', {}, head), body);
    const left = running.length - shown.length;
    $('fc-count').textContent = left ? fmtInt(shown.length) + ' of ' + fmtInt(running.length) + ' open cases shown.' : fmtInt(running.length) + ' open cases.';
    $('fc-more').hidden = left === 0;
    $('fc-more').textContent = 'Show ' + fmtInt(Math.min(FC_PAGE, left)) + ' more';
  }
  $('fc-csv').addEventListener('click', () => {
    if (!forecast) return;
    const q = (v) => '"' + String(v).replace(/"/g, '""') + '"';
    const lines = [['case', 'last_activity', 'events', 'expected_finish', 'finish_low', 'finish_high', 'median_remaining_days', 'outcome_probability'].join(',')];
    for (const r of forecast.running) {
      const fc = r.forecast;
      lines.push([q(r.case), q(r.last_activity), r.events, r.expected_finish, r.finish_low, r.finish_high, (fc.median_seconds / 86400).toFixed(3), forecast.outcome ? fc.outcome_probability.toFixed(4) : ''].join(','));
    }
    download('forecasts.csv', 'text/csv', lines.join('\n') + '\n');
  });

  startEngine();
})();
