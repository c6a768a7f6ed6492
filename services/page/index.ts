/**
 * GET /: a small page to try the service by hand. Paste a line list (JSON, CSV or JCAMP-DX) or drop a file, name
 * the species, and the report appears below. Plain HTML and a few lines of script; everything it calls is public
 * API of this service.
 */
export const PAGE = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1">
<title>branchwise — try a line list</title>
<link rel="icon" href="data:,">
<style>
body{font:14px/1.45 system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;color:#1d2330;max-width:1000px;margin:0 auto;padding:20px}
h1{font-size:20px;margin:0 0 6px}p{margin:4px 0 12px;color:#5b6474}
textarea{width:100%;height:180px;font:12px ui-monospace,Menlo,Consolas,monospace;border:1px solid #c7ccd6;border-radius:4px;padding:8px}
.row{display:flex;gap:12px;align-items:center;flex-wrap:wrap;margin:10px 0}
label{font-weight:600}input[type=text]{padding:5px 8px;border:1px solid #c7ccd6;border-radius:4px;width:140px}
button{background:#0072B2;color:#fff;border:0;border-radius:4px;padding:8px 16px;font-weight:600;cursor:pointer}
#drop{border:2px dashed #9aa3b2;border-radius:6px;padding:14px;text-align:center;color:#5b6474}
#drop.over{border-color:#0072B2;color:#0072B2}
#status{font-weight:600}#status.error{color:#b3261e}
iframe{width:100%;height:1400px;border:1px solid #d9dde4;border-radius:4px;margin-top:12px}
</style></head>
<body>
<h1>branchwise</h1>
<p>Paste a line list or spectrum (JSON as for POST /v1/checks, CSV, or JCAMP-DX), or drop a file, then make the report.
branchwise computes constants from data; it certifies nothing about the safety or purity of a gas.</p>
<div id="drop">Drop a .json, .csv or .jdx file here, or <input type="file" id="file" accept=".json,.csv,.jdx,.dx,.jcamp,.txt"></div>
<textarea id="input" spellcheck="false" placeholder='{"species":"HCl","lines":[{"position":2906.25}, …]}'></textarea>
<div class="row"><label for="species">Species</label><input type="text" id="species" placeholder="e.g. HCl, CO">
<button id="go" type="button">Make report</button><span id="status" role="status"></span></div>
<iframe id="report" title="report" sandbox></iframe>
<script>
const input = document.getElementById('input');
const status = document.getElementById('status');
const drop = document.getElementById('drop');
function readFile(f) { f.text().then((t) => { input.value = t; status.textContent = f.name + ' loaded'; status.className = ''; }); }
document.getElementById('file').addEventListener('change', (e) => { if (e.target.files[0]) readFile(e.target.files[0]); });
drop.addEventListener('dragover', (e) => { e.preventDefault(); drop.classList.add('over'); });
drop.addEventListener('dragleave', () => drop.classList.remove('over'));
drop.addEventListener('drop', (e) => { e.preventDefault(); drop.classList.remove('over'); if (e.dataTransfer.files[0]) readFile(e.dataTransfer.files[0]); });
document.getElementById('go').addEventListener('click', async () => {
  const text = input.value.trim();
  const species = document.getElementById('species').value.trim();
  let type = 'text/csv';
  let body = text;
  if (text.startsWith('{')) {
    type = 'application/json';
    if (species) { try { const j = JSON.parse(text); j.species = species; body = JSON.stringify(j); } catch (err) { status.textContent = 'not valid JSON'; status.className = 'error'; return; } }
  } else if (text.startsWith('##')) type = 'chemical/x-jcamp-dx';
  const url = '/v1/reports' + (type !== 'application/json' && species ? '?species=' + encodeURIComponent(species) : '');
  status.textContent = 'working…'; status.className = '';
  const r = await fetch(url, { method: 'POST', headers: { 'content-type': type }, body });
  if (!r.ok) { const p = await r.json().catch(() => ({ detail: r.statusText })); status.textContent = (p.title ? p.title + ': ' : '') + (p.detail || ''); status.className = 'error'; return; }
  document.getElementById('report').srcdoc = await r.text();
  status.textContent = 'report ready'; status.className = '';
});
</script>
</body></html>`;
