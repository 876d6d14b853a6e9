// The page of narrows explore: it reads the state from the server, shows
// it, and sends the planner's changes back; the server re-scans.
const token = document.querySelector('meta[name="narrows-token"]').content;
const $ = (id) => document.getElementById(id);
let state = null;
let selected = null;
let shown = 0; // states shown: body[data-shown] tells a waiting reader a change arrived

function report(msg) {
  const li = document.createElement('li');
  li.textContent = msg;
  $('errors').append(li);
}
window.addEventListener('error', (e) => report('error: ' + e.message));
window.addEventListener('unhandledrejection', (e) => report('error: ' + e.reason));

async function call(method, path, body) {
  const opts = { method, headers: {} };
  if (body !== undefined) {
    opts.headers['Content-Type'] = 'application/json';
    opts.headers['X-Narrows-Token'] = token;
    opts.body = JSON.stringify(body);
  }
  const res = await fetch(path, opts);
  const data = await res.json();
  if (!res.ok) throw new Error(data.error || res.statusText);
  return data;
}

async function send(path, body) {
  $('status').textContent = path === '/api/report' ? 'Writing the report…' : path === '/api/save' ? 'Saving…' : 'Re-scanning…';
  try {
    const data = await call('POST', path, body);
    if (path === '/api/save') {
      $('saved').textContent = 'Saved: ' + data.saved;
      $('status').textContent = 'Saved.';
      return;
    }
    if (path === '/api/report') {
      if (data.saved) $('saved').textContent = 'Saved: ' + data.saved;
      $('written').replaceChildren(...data.written.map((p) => el('li', { textContent: p })));
      $('status').textContent = `Report written: ${data.written.length} files.`;
      return;
    }
    show(data);
  } catch (err) {
    $('status').textContent = 'Not applied: ' + err.message;
  }
}

const fmt = (x, d = 1) => Number(x).toLocaleString('en', { minimumFractionDigits: d, maximumFractionDigits: d });

function el(tag, props = {}, ...children) {
  const e = document.createElement(tag);
  Object.assign(e, props);
  e.append(...children);
  return e;
}

function show(s) {
  state = s;
  $('title').textContent = s.title;
  $('headline').textContent = s.headline;
  $('caution').textContent = s.caution;
  $('status').textContent = `${s.findings.length} findings, window ${s.window}, re-scanned in ${fmt(s.millis, 0)} ms` + (s.note ? ' — ' + s.note : '');
  $('save').disabled = !s.can_save;
  $('write-report').disabled = !s.can_save;
  const set = s.settings;
  for (const k of ['before', 'after', 'from', 'to', 'focus', 'min_trips', 'support', 'k', 'detour_floor']) $(k).value = set[k] ?? '';
  $('speed_gate').checked = set.speed_gate;
  $('days').value = set.days;
  const win = $('window');
  win.replaceChildren(...s.windows.map((w) => el('option', { value: w, textContent: w })));
  win.value = s.window;
  for (const id of ['xpair_a', 'xpair_b']) {
    const opts = s.regions.map((r) => el('option', { value: r.id, textContent: `${r.id} ${r.name || ''}` }));
    if (id === 'xpair_b') opts.unshift(el('option', { value: 0, textContent: '(every pair of the region)' }));
    const sel = $(id), was = sel.value;
    sel.replaceChildren(...opts);
    if (was) sel.value = was;
  }
  $('mapbox').innerHTML = s.map; // drawn by the server from the study's own data
  showExclusions(s.exclusions);
  showStrip(s.days);
  showFindings(s.findings);
  $('total').textContent = `(total ${fmt(s.total_cost)} extra vehicle-hours per day)`;
  const again = s.findings.find((f) => f.id === selected);
  showDetail(again || null);
  if (shown === 0) performance.mark('narrows-list-rendered');
  document.body.dataset.shown = ++shown;
}

function showExclusions(x) {
  const items = [];
  (x.days || []).forEach((d, i) => items.push(el('li', {}, `days ${d.from}${d.to && d.to !== d.from ? '..' + d.to : ''}: ${d.reason}`,
    el('button', { type: 'button', textContent: 'remove', onclick: () => send('/api/exclusions', { days: x.days.filter((_, j) => j !== i), pairs: x.pairs || [] }) }))));
  (x.pairs || []).forEach((p, i) => items.push(el('li', {}, `${p.b ? 'pair ' + p.a + '-' + p.b : 'region ' + p.a}: ${p.reason}`,
    el('button', { type: 'button', textContent: 'remove', onclick: () => send('/api/exclusions', { days: x.days || [], pairs: x.pairs.filter((_, j) => j !== i) }) }))));
  $('exclusions').replaceChildren(...items);
}

function showStrip(days) {
  const top = Math.max(1, ...days.map((d) => d.cost));
  $('strip').replaceChildren(...days.map((d) => {
    const cls = ['day'];
    if (d.excluded) cls.push('excluded');
    else if (!d.period) cls.push('off');
    else if (d.period === 'after') cls.push('after');
    const cell = el('div', { className: cls.join(' '), title: `${d.day}: ${fmt(d.cost)} extra veh-h` + (d.excluded ? ` (excluded: ${d.excluded})` : d.period ? ` (${d.period})` : ' (not analysed)') });
    cell.dataset.day = d.day;
    cell.style.height = Math.max(4, 66 * d.cost / top) + 'px';
    cell.onclick = () => { $('xday_from').value = d.day; $('xday_to').value = ''; $('xday_reason').focus(); };
    return cell;
  }));
}

function showFindings(fs) {
  $('ranked').tBodies[0].replaceChildren(...fs.map((f) => {
    const tr = el('tr', { className: 'finding' + (f.id === selected ? ' selected' : '') },
      el('td', { textContent: f.rank + (f.period === 'after' ? ' (after)' : '') }),
      el('td', { textContent: (f.focus ? '◎ ' : '') + f.name, title: f.focus ? 'in the focus area' : '' }),
      el('td', { className: 'num', textContent: fmt(f.cost) }),
      el('td', { className: 'num', textContent: fmt(100 * f.share, 0) + ' %' }),
      el('td', { className: 'verdict-' + (f.verdict || 'none'), textContent: f.verdict || '' }));
    tr.dataset.id = f.id;
    tr.onclick = () => { selected = f.id; showFindings(state.findings); showDetail(f); };
    return tr;
  }));
}

function showDetail(f) {
  const d = $('detail');
  if (!f) { d.replaceChildren(); return; }
  const rows = f.edges.map((e) => el('tr', {},
    el('td', { textContent: `${e.from}→${e.to}` }), el('td', { className: 'num', textContent: fmt(100 * e.share, 0) + ' %' }),
    el('td', { className: 'num', textContent: fmt(e.trips, 0) }), el('td', { className: 'num', textContent: fmt(e.speed_kmh) }),
    el('td', { className: 'num', textContent: fmt(e.detour, 2) }), el('td', { className: 'num', textContent: fmt(e.cost) })));
  const table = el('table', {}, el('thead', {}, el('tr', {}, ...['edge', 'days weak', 'trips/day', 'km/h', 'detour', 'extra veh-h/day'].map((h) => el('th', { textContent: h })))), el('tbody', {}, ...rows));
  const parts = [el('h2', { textContent: `${f.rank}. ${f.name} (${f.id})` }),
    el('button', { type: 'button', id: 'focus-here', textContent: `Focus on this place (regions ${f.regions.join(', ')})`,
      onclick: () => send('/api/settings', { ...state.settings, focus: f.regions.join(',') }) })];
  if (f.verdict) parts.push(el('p', { textContent: `Verdict: ${f.verdict}. ${f.reason}` }));
  parts.push(table, el('h2', { textContent: 'Daily: extra vehicle-hours (bars; red: excluded day)' }), timeline(f.daily));
  d.replaceChildren(...parts);
}

// timeline draws the finding's daily cost over every day of the strip,
// marking the excluded days.
function timeline(daily) {
  const ns = 'http://www.w3.org/2000/svg';
  const svg = document.createElementNS(ns, 'svg');
  svg.setAttribute('class', 'timeline');
  const days = state.days;
  const by = new Map(daily.map((d) => [d.day, d]));
  const top = Math.max(1, ...daily.map((d) => d.cost));
  const w = 1000 / Math.max(1, days.length);
  svg.setAttribute('viewBox', '0 0 1000 90');
  svg.setAttribute('preserveAspectRatio', 'none');
  days.forEach((day, i) => {
    const v = by.get(day.day);
    const r = document.createElementNS(ns, 'rect');
    const h = day.excluded ? 90 : v ? 86 * v.cost / top : 0;
    r.setAttribute('x', i * w); r.setAttribute('width', Math.max(1, w - 1));
    r.setAttribute('y', 90 - h); r.setAttribute('height', h);
    r.setAttribute('fill', day.excluded ? '#f4c7cf' : v && v.weak ? '#b00020' : '#6c8ebf');
    const t = document.createElementNS(ns, 'title');
    t.textContent = v ? `${day.day}: ${fmt(v.cost)} veh-h, ${v.trips} trips, ${fmt(v.speed_kmh)} km/h, detour ${fmt(v.detour, 2)}` : `${day.day}` + (day.excluded ? ` excluded: ${day.excluded}` : '');
    r.append(t);
    svg.append(r);
  });
  return svg;
}

$('settings').addEventListener('submit', (e) => {
  e.preventDefault();
  const num = (id) => Number($(id).value);
  send('/api/settings', {
    before: $('before').value.trim(), after: $('after').value.trim(), from: $('from').value, to: $('to').value, focus: $('focus').value.trim(),
    window: $('window').value, days: $('days').value, min_trips: num('min_trips'), support: num('support'),
    k: num('k'), detour_floor: num('detour_floor'), speed_gate: $('speed_gate').checked,
  });
});
$('exclude-day').addEventListener('submit', (e) => {
  e.preventDefault();
  const x = state.exclusions;
  const d = { from: $('xday_from').value, reason: $('xday_reason').value.trim() };
  if ($('xday_to').value) d.to = $('xday_to').value;
  send('/api/exclusions', { days: [...(x.days || []), d], pairs: x.pairs || [] });
});
$('exclude-pair').addEventListener('submit', (e) => {
  e.preventDefault();
  const x = state.exclusions;
  const p = { a: Number($('xpair_a').value), reason: $('xpair_reason').value.trim() };
  if (Number($('xpair_b').value)) p.b = Number($('xpair_b').value);
  send('/api/exclusions', { days: x.days || [], pairs: [...(x.pairs || []), p] });
});
$('save').addEventListener('click', () => send('/api/save', {}));
$('write-report').addEventListener('click', () => send('/api/report', {}));

call('GET', '/api/state').then(show).catch((err) => report('could not load the state: ' + err.message));
