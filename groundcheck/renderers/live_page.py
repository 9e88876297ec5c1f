"""The live view's page: one HTML document with its style and a small script inlined, no network
fetches but to the local server it came from.

The script listens to the server's events (``events``), fetches the new state (``state``) and
applies it, both relative to the page's own address (which holds the view's token):
sections replaced by the fragments the server escaped, text set as text, never as markup.  Hovering
or focusing a finding highlights the shapes of its elements in both drawings and shows its plan
line; clicking a shape of a conductor shows its figures.  While the plan has errors the last good
result stays, greyed (a page opened or reloaded then shows it too); while the plan is analysed
again the status says so and counts the seconds.
"""

from __future__ import annotations

from ..core.errors import html_text as escape

__all__ = ["live_page"]

CSS = """
*{box-sizing:border-box}
body{font-family:system-ui,Helvetica,Arial,sans-serif;margin:0;color:#1d2327;background:#f4f5f2}
header{display:flex;gap:1em;align-items:center;padding:.6em 1em;background:#26323a;color:#f4f5f2;
position:sticky;top:0;z-index:2}
header h1{font-size:1.1em;margin:0;flex:1;white-space:nowrap;overflow:hidden;
text-overflow:ellipsis}
#badge{font-weight:bold;padding:.15em .7em;border-radius:1em;background:#6b7b86}
#badge.clean{background:#2d7a3a}#badge.partial{background:#6b5a00}
#badge.note{background:#1f6f8b}#badge.warning{background:#a07800}
#badge.fault{background:#c4500f}#badge.danger{background:#b00020}#badge.error{background:#7a1fa2}
#status{font-size:.85em;color:#c9d3d9}
.caution{margin:0;padding:.5em 1em;background:#fff1c9;border-bottom:2px solid #d89b00;
font-weight:600}
#errors{margin:.8em 1em;padding:.6em .9em;background:#fbe4f7;border-left:5px solid #7a1fa2}
#errors .where{font-family:ui-monospace,monospace;font-weight:bold}
#errors pre{margin:.2em 0 .5em;background:#fff;padding:.2em .5em}
main{display:grid;grid-template-columns:minmax(0,3fr) minmax(22em,2fr);gap:1em;padding:1em}
section{background:#fff;border:1px solid #d5d9d4;border-radius:6px;padding:.4em .9em;
margin-bottom:1em}
h2{font-size:1em;margin:.3em 0 .5em;color:#3b4b55;text-transform:uppercase;letter-spacing:.05em}
.drawing svg{width:100%;height:auto;max-height:80vh}.chart svg{width:100%;height:auto}
body.stale .drawing,body.stale .result{filter:grayscale(1);opacity:.45}
table{border-collapse:collapse;font-size:.85em;margin:.3em 0}
td,th{border:1px solid #dde;padding:.2em .45em;text-align:left;vertical-align:top}
th{background:#eef0ec}td.num{text-align:right;font-variant-numeric:tabular-nums}
tr.finding{cursor:pointer}tr.finding:hover,tr.finding.pinned{background:#fff4d6}
.sev{font-weight:bold;padding:0 .35em;border-radius:3px;color:#fff}.danger{background:#b00020}
.fault{background:#c4500f}.warning{background:#a07800}.note{background:#1f6f8b}
.fix{color:#1f5a2a}.fig,.where{color:#56616a;font-size:.85em}.ok{color:#2d7a3a}.bad{color:#b00020}
.cleared{color:#2d7a3a}.introduced{color:#b00020}
#planline{font-family:ui-monospace,monospace;white-space:pre-wrap;background:#f7f7f2;
padding:.3em .5em;min-height:1.6em}
#inspect table{width:100%}
.hl path,.hl polygon,.hl ellipse,.hl polyline{stroke:#ff1f8f!important;stroke-width:5px!important}
.hl text{fill:#c0006a!important;font-weight:bold}
.drawing g.node,.drawing g.edge{cursor:pointer}
"""

SCRIPT = r"""
(function () {
  'use strict';
  var $ = function (id) { return document.getElementById(id); };
  var state = null, pinned = null, selected = null, shown = false, busy = null, ticker = null;
  function setText(id, text) { $(id).textContent = text; }
  function highlight(classes) {
    document.querySelectorAll('.drawing .hl').forEach(function (el) {
      el.classList.remove('hl');
    });
    (classes || []).forEach(function (c) {
      document.querySelectorAll('.drawing .' + CSS.escape(c)).forEach(function (el) {
        el.classList.add('hl');
      });
    });
  }
  function showFinding(i) {
    var m = state.marks[i];
    highlight(m.classes);
    setText('planline', m.where + (m.line ? '\n' + m.line : ''));
  }
  function showConductor(cls) {
    var box = $('inspect'), c = state.conductors[cls];
    selected = cls;
    box.replaceChildren();
    var h = document.createElement('p');
    h.textContent = c ? c.name : cls.replace(/^gc-/, '');
    box.appendChild(h);
    if (!c) { return; }
    var t = document.createElement('table');
    c.rows.forEach(function (r) {
      var tr = t.insertRow(), a = tr.insertCell(), b = tr.insertCell();
      a.textContent = r[0]; b.textContent = r[1]; b.className = 'num';
    });
    box.appendChild(t);
    highlight([cls]);
  }
  function bind() {
    document.querySelectorAll('tr.finding').forEach(function (tr) {
      var i = Number(tr.dataset.index);
      tr.addEventListener('mouseenter', function () { if (pinned === null) { showFinding(i); } });
      tr.addEventListener('focus', function () { showFinding(i); });
      tr.addEventListener('click', function () {
        document.querySelectorAll('tr.pinned').forEach(function (x) {
          x.classList.remove('pinned');
        });
        pinned = pinned === i ? null : i;
        if (pinned !== null) { tr.classList.add('pinned'); showFinding(i); }
      });
    });
    document.querySelectorAll('.drawing g.node, .drawing g.edge').forEach(function (g) {
      g.addEventListener('click', function () {
        var cls = Array.prototype.find.call(g.classList, function (c) {
          return c.indexOf('gc-') === 0;
        });
        if (cls) { showConductor(cls); }
      });
    });
  }
  function apply(s) {
    state = s;
    document.title = 'groundcheck live: ' + (s.title || s.file);
    setText('title', (s.title || '') + (s.file ? ' — ' + s.file : ''));
    setText('badge', s.verdict);
    $('badge').className = s.ok ? (s.worst || (s.clean ? 'clean' : 'partial')) : 'error';
    setText('status', s.ok
      ? 'updated ' + new Date().toLocaleTimeString() + ' (' + Math.round(s.seconds * 1000) + ' ms)'
      : 'the plan has errors: the last good result is shown greyed');
    var err = $('errors');
    err.replaceChildren();
    (s.error || []).forEach(function (e) {
      var p = document.createElement('div'), w = document.createElement('span');
      w.className = 'where'; w.textContent = e.where + ': ';
      p.appendChild(w);
      p.appendChild(document.createTextNode(e.message + (e.hint ? ' (' + e.hint + ')' : '')));
      err.appendChild(p);
      if (e.line) {
        var pre = document.createElement('pre');
        pre.textContent = e.line;
        err.appendChild(pre);
      }
    });
    err.hidden = !s.error;
    document.body.classList.toggle('stale', !s.ok);
    showBusy();
    // a page opened while the plan has errors shows the last good result the state holds, greyed
    if (!s.ok && (shown || !Object.keys(s.sections).length)) { return; }
    shown = true;
    Object.keys(s.sections).forEach(function (k) { $('sec-' + k).innerHTML = s.sections[k]; });
    $('physical').innerHTML = s.physical ||
      '<p>No physical drawing (the plan gives no positions, or Graphviz is missing).</p>';
    $('topology').innerHTML = s.topology || '<p>No topology drawing (Graphviz is missing).</p>';
    pinned = null;
    bind();
    // the selected conductor's figures, as they are now
    if (selected) { showConductor(selected); }
  }
  function showBusy() {
    if (busy === null) { return; }
    setText('status', (state ? 're-analysing' : 'analysing') + ' the plan… ' +
      Math.floor((Date.now() - busy) / 1000) + ' s');
  }
  function analysing(ev) {
    busy = Date.now() - parseFloat(ev.data) * 1000;
    showBusy();
    if (ticker === null) { ticker = setInterval(showBusy, 1000); }
  }
  function done() {
    busy = null;
    clearInterval(ticker);
    ticker = null;
    load();
  }
  function load() {
    fetch('state', {cache: 'no-store'}).then(function (r) { return r.json(); }).then(apply)
      .catch(function () { setText('status', 'cannot reach groundcheck: is it still running?'); });
  }
  var events = new EventSource('events');
  events.addEventListener('state', done);
  events.addEventListener('analysing', analysing);
  events.onerror = function () { setText('status', 'connection to groundcheck lost; retrying…'); };
  load();
})();
"""


def live_page(nonce: str, caution: str) -> str:
    """The page the live view serves; its script runs only with this response's ``nonce`` (the
    server's Content-Security-Policy allows no other script)."""
    return f"""<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>groundcheck live</title><style>{CSS}</style></head>
<body><header><h1 id="title">loading…</h1><span id="badge">…</span><span id="status"></span>
</header>
<p class="caution">{escape(caution)}</p>
<div id="errors" hidden></div>
<main><div>
<section><h2>Physical drawing</h2><div class="drawing" id="physical"></div></section>
<section><h2>Topology</h2><div class="drawing" id="topology"></div></section>
</div><div>
<section class="result"><h2>Summary</h2><div id="sec-summary"></div></section>
<section><h2>Last edit</h2><div id="sec-changes"></div></section>
<section class="result"><h2>Findings</h2><div id="planline"></div><div id="sec-findings"></div>
</section>
<section><h2>Selected conductor</h2>
<div id="inspect"><p>Click a conductor in a drawing.</p></div></section>
<section class="result"><h2>Hum and buzz</h2><div id="sec-hum"></div></section>
<section class="result"><h2>Protective earth</h2><div id="sec-protective"></div></section>
</div></main>
<script nonce="{nonce}">{SCRIPT}</script>
</body></html>
"""
