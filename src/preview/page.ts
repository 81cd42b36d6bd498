// The preview page: one HTML document with its style and script inline (under a per-response
// nonce), no libraries, no requests but to its own server. Everything the shot names (lights,
// elements, errors) is put on the page as text, never as markup.

export function previewPage(nonce: string): string {
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>straylight preview</title>
<meta name="viewport" content="width=device-width, initial-scale=1">
<style nonce="${nonce}">${STYLE}</style>
</head>
<body>
<header>
  <h1>straylight preview</h1>
  <span id="shot"></span>
  <span id="status" role="status" aria-live="polite">loading the shot</span>
</header>
<main>
  <section id="viewer">
    <div id="stage"><img id="frame" alt="the flare pass at the current frame"><svg id="overlay" aria-hidden="true"></svg></div>
    <div id="transport">
      <button id="play" type="button" title="play at the shot's rate (space)">Play</button>
      <input id="slider" type="range" min="0" max="0" value="0" aria-label="frame">
      <output id="frameLabel" for="slider"></output>
      <span id="cacheInfo"></span>
    </div>
    <figure>
      <svg id="curve" role="img" aria-label="each light's visibility per frame"></svg>
      <figcaption>Visibility of each light (shutter average; 1 = fully clear, 0 = hidden). Click to go to a frame.</figcaption>
    </figure>
  </section>
  <aside id="controls">
    <h2>Elements</h2>
    <p class="hint">Switches and gains act on the page's picture only, on top of the shot's settings, until written to the shot file.</p>
    <table id="elements"><thead><tr><th>on</th><th>element</th><th>gain</th><th></th></tr></thead><tbody></tbody></table>
    <label><input id="showGhosts" type="checkbox"> name the ghosts (as <code>straylight lens</code> does)</label>
    <label id="plateRow"><input id="showPlate" type="checkbox" checked> plate under the pass</label>
    <div class="buttons">
      <button id="reset" type="button">Back to the shot's settings</button>
      <button id="write" type="button">Write to the shot file</button>
    </div>
    <p id="writeStatus" role="status"></p>
    <h2>Shot</h2>
    <dl id="facts"></dl>
    <h2>Problems</h2>
    <pre id="errors">none</pre>
  </aside>
</main>
<script nonce="${nonce}">${SCRIPT}</script>
</body>
</html>
`;
}

const STYLE = `
:root { color-scheme: dark; --bg: #1b1b1b; --panel: #252525; --fg: #e8e8e8; --dim: #a8a8a8; --accent: #56b4e9; --bad: #ff8a80; }
* { box-sizing: border-box; }
[hidden] { display: none !important; }
body { margin: 0; background: var(--bg); color: var(--fg); font: 14px/1.4 system-ui, sans-serif; }
header { display: flex; gap: 16px; align-items: baseline; padding: 8px 16px; background: var(--panel); flex-wrap: wrap; }
h1 { font-size: 16px; margin: 0; }
h2 { font-size: 14px; margin: 16px 0 6px; color: var(--dim); text-transform: uppercase; letter-spacing: .05em; }
#shot { color: var(--dim); }
#status { margin-left: auto; }
#status.bad { color: var(--bad); }
main { display: grid; grid-template-columns: minmax(0, 1fr) 320px; gap: 16px; padding: 16px; }
#stage { position: relative; background: #000; line-height: 0; }
#frame { width: 100%; height: auto; display: block; image-rendering: auto; }
#frame.stale { opacity: .45; }
#overlay { position: absolute; inset: 0; width: 100%; height: 100%; pointer-events: none; }
#transport { display: flex; gap: 12px; align-items: center; margin: 8px 0; }
#slider { flex: 1; }
#frameLabel { font-variant-numeric: tabular-nums; min-width: 15em; }
#cacheInfo { color: var(--dim); font-size: 12px; min-width: 9em; }
figure { margin: 8px 0 0; }
figcaption { color: var(--dim); font-size: 12px; }
#curve { width: 100%; height: 180px; display: block; background: var(--panel); cursor: pointer; }
aside { background: var(--panel); padding: 8px 12px; align-self: start; }
.hint { color: var(--dim); font-size: 12px; margin: 0 0 8px; }
table { border-collapse: collapse; width: 100%; }
th { text-align: left; color: var(--dim); font-weight: normal; font-size: 12px; }
td { padding: 2px 4px; }
td input[type=range] { width: 120px; }
td.gain { font-variant-numeric: tabular-nums; width: 3.5em; text-align: right; }
label { display: block; margin: 8px 0; }
.buttons { display: flex; gap: 8px; margin-top: 12px; flex-wrap: wrap; }
button { background: #3a3a3a; color: var(--fg); border: 1px solid #555; padding: 4px 10px; border-radius: 3px; cursor: pointer; }
button:hover { border-color: var(--accent); }
#errors { white-space: pre-wrap; color: var(--dim); font-size: 12px; margin: 0; }
#errors.bad { color: var(--bad); }
dl { display: grid; grid-template-columns: auto 1fr; gap: 2px 8px; margin: 0; font-size: 12px; }
dt { color: var(--dim); }
dd { margin: 0; }
`;

// The page's script: plain browser JavaScript (it runs in the page, not in Node).
const SCRIPT = `
'use strict';
const $ = (id) => document.getElementById(id);
const SVG = 'http://www.w3.org/2000/svg';
const PALETTE = ['#56b4e9', '#e69f00', '#009e73', '#f0e442', '#0072b2', '#d55e00', '#cc79a7'];
let state = null;          // /api/state
let shown = null;          // state.showing
let current = null;        // frame number on screen
let settings = {};         // element -> { on, gain }
let visibility = null;
let playing = null;
let generation = 0;        // bumps when what a frame looks like changes: stops stale prefetching
let resetAfterReload = false;
const ready = new Map();   // frame url -> { src, ms, note }
const pending = new Map(); // frame url -> promise

function el(tag, attrs, text) {
  const e = document.createElementNS(SVG, tag);
  for (const k in attrs) e.setAttribute(k, attrs[k]);
  if (text !== undefined) e.textContent = text;
  return e;
}

function setStatus(text, bad) {
  $('status').textContent = text;
  $('status').classList.toggle('bad', Boolean(bad));
}

function frameUrl(n) {
  const parts = shown.elements.map((e) => e.name + ':' + (settings[e.name].on ? 1 : 0) + ':' + settings[e.name].gain);
  return '/api/frame?n=' + n + '&v=' + shown.version + '&el=' + encodeURIComponent(parts.join(',')) + '&plate=' + (shown.plate && $('showPlate').checked ? 1 : 0);
}

function getFrame(n) {
  const u = frameUrl(n);
  if (ready.has(u)) return Promise.resolve(ready.get(u));
  if (pending.has(u)) return pending.get(u);
  const p = fetch(u).then(async (r) => {
    if (!r.ok) throw new Error((await r.json()).error || r.statusText);
    const note = r.headers.get('x-note');
    const f = { src: URL.createObjectURL(await r.blob()), ms: Number(r.headers.get('x-render-ms')), note: note ? decodeURIComponent(note) : '' };
    ready.set(u, f);
    if (ready.size > 600) { const [k, v] = ready.entries().next().value; URL.revokeObjectURL(v.src); ready.delete(k); }
    return f;
  }).finally(() => pending.delete(u));
  pending.set(u, p);
  return p;
}

function label(n) {
  return 'frame ' + n + ' \\u00b7 ' + shown.timecodes[n - shown.first];
}

async function show(n, why) {
  current = n;
  $('slider').value = String(n);
  $('frameLabel').textContent = label(n);
  drawCurve();
  const version = shown.version;
  let f;
  try { f = await getFrame(n); } catch (e) { setStatus('frame ' + n + ': ' + e.message, true); return; }
  if (n !== current || version !== shown.version) return;
  const img = $('frame');
  img.src = f.src;
  img.dataset.frame = String(n);
  img.dataset.version = String(version);
  img.dataset.url = frameUrl(n);
  img.classList.toggle('stale', state.errors.length > 0);
  if (!playing) setStatus((why ? why + ': ' : '') + 'frame ' + n + ' drawn in ' + f.ms.toFixed(0) + ' ms' + (f.note ? ' (' + f.note + ')' : ''), Boolean(f.note));
  drawGhosts(n, version);
}

async function drawGhosts(n, version) {
  const svg = $('overlay');
  svg.replaceChildren();
  if (!$('showGhosts').checked || !shown) return;
  svg.setAttribute('viewBox', '0 0 ' + shown.widthPx + ' ' + shown.heightPx);
  const g = await (await fetch('/api/ghosts?n=' + n + '&v=' + version)).json();
  if (n !== current || version !== shown.version) return;
  svg.replaceChildren();
  const size = Math.max(10, shown.heightPx / 40);
  for (const l of g.lights || []) {
    svg.append(el('circle', { cx: l.xPx, cy: l.yPx, r: size * 0.7, fill: 'none', stroke: '#ffffff', 'stroke-width': 1.5 }));
    svg.append(el('text', { x: l.xPx + size, y: l.yPx - size * 0.6, fill: '#ffffff', 'font-size': size, 'font-family': 'sans-serif' }, l.name));
  }
  for (const m of g.marks || []) {
    if (m.xPx < -size || m.yPx < -size || m.xPx > shown.widthPx + size || m.yPx > shown.heightPx + size) continue;
    svg.append(el('circle', { class: 'ghost', cx: m.xPx, cy: m.yPx, r: 3, fill: '#f0e442' }));
    svg.append(el('text', { class: 'ghost-name', x: m.xPx + 5, y: m.yPx - 5, fill: '#f0e442', stroke: '#000000', 'stroke-width': 3, 'paint-order': 'stroke', 'font-size': size * 0.8, 'font-family': 'sans-serif' }, m.name));
  }
}

function niceStep(span, count) {
  const raw = span / count;
  const p = Math.pow(10, Math.floor(Math.log10(raw)));
  for (const m of [1, 2, 5, 10]) if (m * p >= raw) return m * p;
  return 10 * p;
}

function drawCurve() {
  const svg = $('curve');
  if (!shown) return;
  const W = svg.clientWidth || 800, H = svg.clientHeight || 180;
  const M = { l: 56, r: 12, t: 26, b: 38 };
  svg.setAttribute('viewBox', '0 0 ' + W + ' ' + H);
  svg.replaceChildren();
  const span = Math.max(1, shown.last - shown.first);
  const X = (f) => M.l + (f - shown.first) / span * (W - M.l - M.r);
  const Y = (v) => M.t + (1 - v) * (H - M.t - M.b);
  const axis = { stroke: '#888888', 'stroke-width': 1 };
  const txt = { fill: '#bbbbbb', 'font-size': 11, 'font-family': 'sans-serif' };
  svg.append(el('line', { x1: M.l, y1: Y(0), x2: W - M.r, y2: Y(0), ...axis }));
  svg.append(el('line', { x1: M.l, y1: Y(0), x2: M.l, y2: Y(1), ...axis }));
  for (const v of [0, 0.25, 0.5, 0.75, 1]) {
    svg.append(el('line', { x1: M.l - 4, y1: Y(v), x2: M.l, y2: Y(v), ...axis }));
    svg.append(el('line', { x1: M.l, y1: Y(v), x2: W - M.r, y2: Y(v), stroke: '#3a3a3a', 'stroke-width': 1 }));
    svg.append(el('text', { x: M.l - 7, y: Y(v) + 4, 'text-anchor': 'end', ...txt }, String(v)));
  }
  const step = niceStep(span, Math.max(2, Math.floor((W - M.l - M.r) / 70)));
  for (let f = Math.ceil(shown.first / step) * step; f <= shown.last; f += step) {
    svg.append(el('line', { x1: X(f), y1: Y(0), x2: X(f), y2: Y(0) + 4, ...axis }));
    svg.append(el('text', { x: X(f), y: Y(0) + 16, 'text-anchor': 'middle', ...txt }, String(f)));
  }
  svg.append(el('text', { x: (M.l + W - M.r) / 2, y: H - 4, 'text-anchor': 'middle', ...txt }, 'frame'));
  svg.append(el('text', { x: 12, y: Y(0.5), 'text-anchor': 'middle', transform: 'rotate(-90 12 ' + Y(0.5) + ')', ...txt }, 'visibility'));
  if (visibility && visibility.version === shown.version) {
    visibility.lights.forEach((l, i) => {
      const pts = l.visibility.map((v, k) => X(visibility.frames[k]).toFixed(1) + ',' + Y(v).toFixed(1)).join(' ');
      svg.append(el('polyline', { points: pts, fill: 'none', stroke: PALETTE[i % PALETTE.length], 'stroke-width': 2 }));
      const lx = M.l + i * 140;
      svg.append(el('rect', { x: lx, y: 8, width: 14, height: 3, fill: PALETTE[i % PALETTE.length] }));
      svg.append(el('text', { x: lx + 18, y: 13, ...txt }, l.name));
    });
  }
  if (current !== null) svg.append(el('line', { id: 'curveNow', x1: X(current), y1: Y(0), x2: X(current), y2: Y(1), stroke: '#ffffff', 'stroke-width': 1.5, 'stroke-dasharray': '3 2' }));
  svg.onclick = (ev) => {
    const r = svg.getBoundingClientRect();
    const x = (ev.clientX - r.left) * W / r.width;
    const f = Math.round(shown.first + (x - M.l) / (W - M.l - M.r) * span);
    if (f >= shown.first && f <= shown.last) show(f);
  };
}

async function loadVisibility() {
  const version = shown.version;
  const r = await fetch('/api/visibility?v=' + version);
  if (!r.ok) return;
  const v = await r.json();
  if (version !== shown.version) return;
  visibility = { ...v, version };
  drawCurve();
}

function buildElements() {
  const body = $('elements').tBodies[0];
  body.replaceChildren();
  for (const e of shown.elements) {
    if (!settings[e.name]) settings[e.name] = { on: e.enabled, gain: 1 };
    const s = settings[e.name];
    const tr = document.createElement('tr');
    const on = document.createElement('input');
    on.type = 'checkbox'; on.checked = s.on; on.id = 'on-' + e.name; on.setAttribute('aria-label', e.name + ' on');
    const gain = document.createElement('input');
    gain.type = 'range'; gain.min = '0'; gain.max = '4'; gain.step = '0.05'; gain.value = String(s.gain); gain.id = 'gain-' + e.name; gain.setAttribute('aria-label', e.name + ' gain');
    const shownGain = document.createElement('td'); shownGain.className = 'gain'; shownGain.textContent = s.gain.toFixed(2);
    on.onchange = () => { s.on = on.checked; changed(); };
    gain.oninput = () => { s.gain = Number(gain.value); shownGain.textContent = s.gain.toFixed(2); };
    gain.onchange = () => changed();
    const c1 = document.createElement('td'); c1.append(on);
    const c2 = document.createElement('td'); const lab = document.createElement('label'); lab.htmlFor = on.id; lab.textContent = e.name + (e.enabled ? '' : ' (off in the shot)'); lab.style.margin = '0'; c2.append(lab);
    const c3 = document.createElement('td'); c3.append(gain);
    tr.append(c1, c2, c3, shownGain);
    body.append(tr);
  }
}

function changed() {
  generation++;
  show(current, 'settings changed');
  if (playing) prefetch();
}

function facts() {
  const d = $('facts');
  d.replaceChildren();
  const add = (k, v) => { const dt = document.createElement('dt'); dt.textContent = k; const dd = document.createElement('dd'); dd.textContent = v; d.append(dt, dd); };
  add('frames', shown.first + '-' + shown.last + ' at ' + shown.rate + ' fps');
  add('preview', shown.widthPx + 'x' + shown.heightPx + ' of ' + shown.fullWidthPx + 'x' + shown.fullHeightPx + ', ghosts at ' + shown.quality);
  add('lights', shown.lights.join(', '));
  if (shown.lens) add('lens', shown.lens);
}

async function loadState(why) {
  state = await (await fetch('/api/state')).json();
  $('shot').textContent = state.shot;
  const errs = $('errors');
  errs.textContent = state.errors.length ? state.errors.join('\\n') : 'none';
  errs.classList.toggle('bad', state.errors.length > 0);
  if (!state.showing) { setStatus('the shot has errors (see Problems)', true); return; }
  const fresh = !shown;
  shown = state.showing;
  if (resetAfterReload) { settings = {}; resetAfterReload = false; }
  buildElements();
  facts();
  $('plateRow').hidden = !shown.plate;
  const s = $('slider');
  s.min = String(shown.first); s.max = String(shown.last);
  if (current === null || current < shown.first || current > shown.last) current = shown.first;
  generation++;
  for (const v of ready.values()) URL.revokeObjectURL(v.src);
  ready.clear();
  if (state.errors.length) { setStatus('the shot has errors (see Problems); showing the last version that loaded', true); $('frame').classList.add('stale'); return; }
  await show(current, why);
  if (fresh || !visibility || visibility.version !== shown.version) loadVisibility();
}

async function prefetch() {
  const mine = ++generation;
  const order = [];
  for (let f = current; f <= shown.last; f++) order.push(f);
  for (let f = shown.first; f < current; f++) order.push(f);
  for (const f of order) {
    if (mine !== generation) return;
    try { await getFrame(f); } catch { return; }
    $('cacheInfo').textContent = cachedCount() + ' of ' + (shown.last - shown.first + 1) + ' frames ready';
  }
}

function cachedCount() {
  let n = 0;
  for (let f = shown.first; f <= shown.last; f++) if (ready.has(frameUrl(f))) n++;
  return n;
}

function togglePlay() {
  if (playing) { clearInterval(playing); playing = null; $('play').textContent = 'Play'; show(current); return; }
  if (!shown) return;
  $('play').textContent = 'Pause';
  prefetch();
  playing = setInterval(() => {
    const next = current >= shown.last ? shown.first : current + 1;
    const f = ready.get(frameUrl(next));
    if (!f) { setStatus('playing: waiting for frame ' + next); return; }
    current = next;
    $('slider').value = String(next);
    $('frameLabel').textContent = label(next);
    $('frame').src = f.src;
    $('frame').dataset.frame = String(next);
    setStatus('playing at ' + shown.rate + ' fps from drawn frames');
    drawCurve();
  }, 1000 / shown.fps);
}

$('slider').oninput = () => show(Number($('slider').value));
$('play').onclick = togglePlay;
$('showGhosts').onchange = () => drawGhosts(current, shown.version);
$('showPlate').onchange = () => changed();
$('reset').onclick = () => { settings = {}; buildElements(); changed(); };
$('write').onclick = async () => {
  const r = await fetch('/api/write', { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ elements: settings }) });
  const out = await r.json();
  if (!r.ok) { $('writeStatus').textContent = out.error; return; }
  if (out.changed.length === 0) { $('writeStatus').textContent = 'nothing to write: the page matches the shot file'; return; }
  resetAfterReload = true;
  $('writeStatus').textContent = 'wrote ' + out.changed.join(', ') + ' to ' + out.file + ' (comments and layout kept)';
};
document.addEventListener('keydown', (ev) => {
  if (!shown || ev.target instanceof HTMLInputElement && ev.target.type !== 'range' && ev.target.type !== 'checkbox') return;
  if (ev.key === 'ArrowRight' && current < shown.last) { ev.preventDefault(); show(current + 1); }
  if (ev.key === 'ArrowLeft' && current > shown.first) { ev.preventDefault(); show(current - 1); }
  if (ev.key === ' ') { ev.preventDefault(); togglePlay(); }
});
window.addEventListener('resize', drawCurve);

const events = new EventSource('/events');
events.onmessage = (m) => {
  const e = JSON.parse(m.data);
  if (e.type !== 'reloaded') return;
  if (e.errors.length) {
    state.errors = e.errors;
    $('errors').textContent = e.errors.join('\\n');
    $('errors').classList.add('bad');
    $('frame').classList.add('stale');
    setStatus(e.changed + ' saved: the shot has errors (see Problems)', true);
    return;
  }
  loadState(e.changed + ' saved, shot reloaded');
};

loadState();
`;
