import { createHash } from 'node:crypto';
import { SAFETY_NOTICE } from '../notice.js';

/**
 * GET /: a small page to try the service by hand. Paste a line list (JSON, CSV or JCAMP-DX) or drop a file, name
 * the species, and the report appears below. Plain HTML and one inline script; everything it calls is public API of
 * this service.
 *
 * It must work as a lab reaches it: by a host name, over plain HTTP, behind API keys. Hence its own security
 * policy (pagePolicy below, without `upgrade-insecure-requests`, which would turn the page's fetch into an https
 * request that nothing answers), network errors shown rather than swallowed, and an API-key field whose value lives
 * in sessionStorage (this tab only, gone when it closes).
 */

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

/** Longest a report request may take before the page gives up and says so, ms. */
const REQUEST_DEADLINE_MS = 180_000;
/** Tries of a request that the service answers 503 (shedding load), and the longest wait between two, s. */
const BUSY_ATTEMPTS = 4;
const BUSY_WAIT_MAX_S = 5;

const SCRIPT = `
const $ = (id) => document.getElementById(id);
const input = $('input'), status = $('status'), drop = $('drop'), frame = $('report'), keyField = $('key');
const KEY_SLOT = 'branchwise.apiKey';
function say(text, kind) { status.textContent = text; status.className = kind || ''; }
function showKey(why) { $('keyrow').hidden = false; if (why) say(why, 'error'); keyField.focus(); }
try { keyField.value = sessionStorage.getItem(KEY_SLOT) || ''; } catch (e) { /* storage disabled: the field still works */ }
keyField.addEventListener('input', () => { try { sessionStorage.setItem(KEY_SLOT, keyField.value.trim()); } catch (e) {} });
$('forget').addEventListener('click', () => { keyField.value = ''; try { sessionStorage.removeItem(KEY_SLOT); } catch (e) {} say('key forgotten'); });
function readFile(f) {
  f.text().then((t) => { input.value = t; say(f.name + ' loaded'); }, (e) => say('could not read ' + f.name + ': ' + e.message, 'error'));
}
$('file').addEventListener('change', (e) => { if (e.target.files[0]) readFile(e.target.files[0]); });
drop.addEventListener('dragover', (e) => { e.preventDefault(); drop.classList.add('over'); });
drop.addEventListener('dragleave', () => drop.classList.remove('over'));
drop.addEventListener('drop', (e) => { e.preventDefault(); drop.classList.remove('over'); if (e.dataTransfer.files[0]) readFile(e.dataTransfer.files[0]); });
function fitFrame() {
  // The frame shares the page's origin (sandbox allow-same-origin, scripts never allowed) so its height can be read.
  try { const d = frame.contentDocument; if (d && d.documentElement) frame.style.height = (d.documentElement.scrollHeight + 24) + 'px'; } catch (e) {}
}
frame.addEventListener('load', fitFrame);
window.addEventListener('resize', fitFrame);
let lastReport = '';
$('save').addEventListener('click', () => {
  if (!lastReport) return;
  const a = document.createElement('a');
  a.href = URL.createObjectURL(new Blob([lastReport], { type: 'text/html' }));
  a.download = 'branchwise-report.html';
  document.body.appendChild(a); a.click(); a.remove();
  setTimeout(() => URL.revokeObjectURL(a.href), 10000);
});
$('print').addEventListener('click', () => { try { frame.contentWindow.print(); } catch (e) { say('printing failed: ' + e.message, 'error'); } });
function sampleFields() {
  const s = {};
  for (const k of ['id', 'description', 'instrument', 'operator', 'measuredAt', 'notes']) {
    const v = $('sample-' + k).value.trim();
    if (v) s[k] = k === 'measuredAt' ? new Date(v).toISOString() : v;
  }
  return Object.keys(s).length ? s : undefined;
}
$('go').addEventListener('click', async () => {
  const text = input.value.trim();
  const species = $('species').value.trim();
  if (!text) { say('paste a line list or choose a file first', 'error'); return; }
  let type = 'text/csv';
  let body = text;
  let sample;
  try { sample = sampleFields(); } catch (e) { say('the measurement time is not a valid date', 'error'); return; }
  if (text.startsWith('{')) {
    type = 'application/json';
    let j;
    try { j = JSON.parse(text); } catch (err) { say('not valid JSON: ' + err.message, 'error'); return; }
    if (species) j.species = species;
    if (sample) j.sample = Object.assign({}, j.sample || {}, sample);
    body = JSON.stringify(j);
  } else if (text.startsWith('##')) type = 'chemical/x-jcamp-dx';
  const q = new URLSearchParams();
  if (type !== 'application/json') {
    if (species) q.set('species', species);
    if (sample) for (const [k, v] of Object.entries(sample)) q.set('sample.' + k, v);
  }
  const url = '/v1/reports' + (q.toString() ? '?' + q.toString() : '');
  const headers = { 'content-type': type };
  const key = keyField.value.trim();
  if (key) headers.authorization = 'Bearer ' + key;
  say('working…');
  $('go').disabled = true;
  const ctl = new AbortController();
  const timer = setTimeout(() => ctl.abort(), ${REQUEST_DEADLINE_MS});
  try {
    let r;
    // A service shedding load answers 503 with Retry-After: wait (at most ${BUSY_WAIT_MAX_S} s) and try again, a few times.
    for (let attempt = 1; ; attempt++) {
      r = await fetch(url, { method: 'POST', headers, body, signal: ctl.signal });
      if (r.status !== 503 || attempt >= ${BUSY_ATTEMPTS}) break;
      const wait = Math.min(${BUSY_WAIT_MAX_S}, Math.max(1, Number(r.headers.get('retry-after')) || 1));
      say('the service is busy (HTTP 503); trying again in ' + wait + ' s (' + attempt + ' of ${BUSY_ATTEMPTS - 1})');
      await new Promise((ok) => setTimeout(ok, wait * 1000));
    }
    if (r.status === 401) { showKey('this service needs an API key: enter it above and make the report again'); return; }
    if (!r.ok) {
      const p = await r.json().catch(() => ({ detail: r.statusText }));
      say('HTTP ' + r.status + ' — ' + (p.title ? p.title + ': ' : '') + (p.detail || ''), 'error');
      return;
    }
    lastReport = await r.text();
    frame.srcdoc = lastReport;
    $('save').disabled = false; $('print').disabled = false;
    say('report ready');
  } catch (e) {
    say(e.name === 'AbortError'
      ? 'no answer within ${REQUEST_DEADLINE_MS / 1000} s: the service may be overloaded; try again later'
      : 'network error: the request did not reach the service (' + e.message + '); check the address and the connection', 'error');
  } finally {
    clearTimeout(timer);
    $('go').disabled = false;
  }
});
`;

/** The CSP source for the page's one inline script, so that no other inline script can run. */
const SCRIPT_HASH = `'sha256-${createHash('sha256').update(SCRIPT).digest('base64')}'`;

/**
 * The page's Content-Security-Policy. It allows only this page's script (by hash), inline styles (the report's
 * stylesheet is inline), and requests to its own origin, whatever the scheme: no `upgrade-insecure-requests`.
 */
export const PAGE_POLICY = [
  "default-src 'none'",
  `script-src ${SCRIPT_HASH}`,
  "style-src 'unsafe-inline'",
  "img-src 'self' data: blob:",
  "connect-src 'self'",
  "frame-src 'self'",
  "base-uri 'none'",
  "form-action 'none'",
  "frame-ancestors 'self'",
  "object-src 'none'",
].join('; ');

const STYLE = `
[hidden]{display:none!important}
body{font:14px/1.45 system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;color:#1d2330;max-width:1000px;margin:0 auto;padding:20px}
h1{font-size:20px;margin:0 0 6px}p{margin:4px 0 12px;color:#5b6474}
textarea{width:100%;height:180px;font:12px ui-monospace,Menlo,Consolas,monospace;border:1px solid #c7ccd6;border-radius:4px;padding:8px;box-sizing:border-box}
.row{display:flex;gap:12px;align-items:center;flex-wrap:wrap;margin:10px 0}
label{font-weight:600}input[type=text],input[type=password],input[type=datetime-local]{padding:5px 8px;border:1px solid #c7ccd6;border-radius:4px;width:160px}
button{background:#0072B2;color:#fff;border:0;border-radius:4px;padding:8px 16px;font-weight:600;cursor:pointer}
button:disabled{background:#9aa3b2;cursor:default}button.plain{background:#fff;color:#0072B2;border:1px solid #0072B2}
#drop{border:2px dashed #9aa3b2;border-radius:6px;padding:14px;text-align:center;color:#5b6474}
#drop.over{border-color:#0072B2;color:#0072B2}
#status{font-weight:600}#status.error{color:#b3261e}
details{margin:8px 0}summary{cursor:pointer;font-weight:600}
.grid{display:grid;grid-template-columns:repeat(auto-fill,minmax(290px,1fr));gap:8px 16px;margin-top:8px}
.grid label{display:flex;justify-content:space-between;gap:8px;align-items:center;font-weight:500}
.caution{border-left:4px solid #b3261e;background:#fbf3f2;padding:8px 12px;color:#1d2330}
iframe{width:100%;height:160px;border:1px solid #d9dde4;border-radius:4px;margin-top:12px}
`;

export interface PageOptions {
  /** The service asks for API keys: show the key field from the start. */
  readonly keysRequired: boolean;
}

export function renderPage(options: PageOptions): string {
  const sampleInput = (k: string, label: string, type = 'text') =>
    `<label for="sample-${k}">${label}<input type="${type}" id="sample-${k}"${type === 'datetime-local' ? ' step="1"' : ''}></label>`;
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1">
<title>branchwise — try a line list</title>
<link rel="icon" href="data:,">
<style>${STYLE}</style></head>
<body>
<h1>branchwise</h1>
<p>Paste a line list or spectrum (JSON as for POST /v1/checks, CSV, or JCAMP-DX), or drop a file, then make the report.</p>
<p class="caution" id="caution">${esc(SAFETY_NOTICE)}</p>
<div id="drop">Drop a .json, .csv or .jdx file here, or <input type="file" id="file" accept=".json,.csv,.jdx,.dx,.jcamp,.txt"></div>
<textarea id="input" spellcheck="false" placeholder='{"species":"HCl","lines":[{"position":2906.25}, …]}'></textarea>
<details id="sample"><summary>Sample (printed at the top of the report)</summary><div class="grid">
${sampleInput('id', 'Sample id')}${sampleInput('description', 'Description')}${sampleInput('instrument', 'Instrument')}${sampleInput('operator', 'Operator')}${sampleInput('measuredAt', 'Measured at', 'datetime-local')}${sampleInput('notes', 'Notes')}
</div></details>
<div class="row" id="keyrow"${options.keysRequired ? '' : ' hidden'}><label for="key">API key</label><input type="password" id="key" autocomplete="off" spellcheck="false"><button type="button" class="plain" id="forget">Forget key</button><span class="hint">kept in this tab only</span></div>
<div class="row"><label for="species">Species</label><input type="text" id="species" placeholder="e.g. HCl, CO">
<button id="go" type="button">Make report</button><button id="save" type="button" class="plain" disabled>Save report</button><button id="print" type="button" class="plain" disabled>Print report</button><span id="status" role="status" aria-live="polite"></span></div>
<iframe id="report" title="report" sandbox="allow-same-origin allow-modals"></iframe>
<script>${SCRIPT}</script>
</body></html>`;
}
