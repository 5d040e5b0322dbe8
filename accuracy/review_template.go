package accuracy

import "html/template"

// The review page. The summary table's headings carry data-col names
// (n, series, status, route, model, error, ratio, in-80%, ..., bias,
// filled, flags) for programs and tests that drive the page. The markup
// is written so that the page is well-formed
// XML too (every element closed, attributes quoted, no named entities),
// and the script sits in a CDATA section behind line comments, which
// browsers ignore.
var reviewTemplate = template.Must(template.New("review").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8"/>
<meta name="viewport" content="width=device-width, initial-scale=1"/>
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; script-src 'unsafe-inline'; img-src data:"/>
<link rel="icon" href="data:,"/>
<title>{{.Title}}</title>
<style>
:root { --ink: #1d2433; --muted: #5b6474; --paper: #fbfaf7; --line: #dcd8cf; --teal: #0f766e; --amber: #b45309; --red: #b91c1c; --blue: #1e5aa8; }
* { box-sizing: border-box; }
body { margin: 0; background: var(--paper); color: var(--ink); font: 15px/1.45 system-ui, -apple-system, "Segoe UI", sans-serif; }
header, main, footer { max-width: 1180px; margin: 0 auto; padding: 0 20px; }
header { padding-top: 22px; }
h1 { font-size: 26px; margin: 0 0 4px; letter-spacing: -0.01em; }
h2 { font-size: 19px; margin: 30px 0 10px; }
h3 { font-size: 15px; margin: 18px 0 6px; color: var(--muted); text-transform: lowercase; font-variant: small-caps; letter-spacing: 0.04em; }
.about { color: var(--muted); max-width: 70em; margin: 0 0 12px; }
.glance { display: flex; flex-wrap: wrap; gap: 8px; list-style: none; padding: 0; margin: 10px 0 0; }
.glance li { border: 1px solid var(--line); border-radius: 6px; padding: 4px 10px; background: #fff; }
.glance b { font-size: 17px; margin-right: 4px; }
.tools { display: flex; flex-wrap: wrap; gap: 14px; align-items: center; margin: 0 0 10px; }
.tools input, .tools select { font: inherit; padding: 4px 8px; border: 1px solid var(--line); border-radius: 5px; background: #fff; }
.tools input { width: 16em; }
#shown { color: var(--muted); }
.wrap { overflow-x: auto; border: 1px solid var(--line); border-radius: 8px; background: #fff; }
table { border-collapse: collapse; width: 100%; }
th, td { padding: 5px 8px; text-align: left; border-bottom: 1px solid #eeebe4; vertical-align: top; }
td.n, th.n { text-align: right; font-variant-numeric: tabular-nums; }
#summary thead th { position: sticky; top: 0; background: #f3f1ea; z-index: 1; }
#summary th button { font: inherit; font-weight: 600; border: 0; background: none; padding: 0; cursor: pointer; color: inherit; text-align: inherit; }
#summary th button::after { content: " \2195"; color: #a7a195; font-weight: 400; }
#summary th[aria-sort="ascending"] button::after { content: " \2191"; color: var(--teal); }
#summary th[aria-sort="descending"] button::after { content: " \2193"; color: var(--teal); }
#summary tbody td { white-space: nowrap; }
#summary tbody td.model { white-space: normal; min-width: 10em; }
#summary tbody td.flags { white-space: normal; min-width: 8em; }
#summary tbody tr:hover { background: #f7f5ef; }
#summary a { color: var(--teal); font-weight: 600; text-decoration: none; }
#summary a:hover { text-decoration: underline; }
.model { font-family: ui-monospace, "SFMono-Regular", Menlo, monospace; font-size: 13px; }
.warn { color: var(--amber); font-weight: 600; }
.st-ok { color: var(--teal); }
.st-fallback { color: var(--amber); }
.st-failed { color: var(--red); font-weight: 600; }
.chip { display: inline-block; font-size: 12px; border-radius: 10px; padding: 0 8px; margin: 1px 3px 1px 0; border: 1px solid currentColor; white-space: nowrap; }
.flag-failed { color: var(--red); }
.flag-fallback, .flag-bias, .flag-behind, .flag-narrow { color: var(--amber); }
.flag-filled, .flag-untested { color: var(--blue); }
.glance li.flag-failed, .glance li.flag-fallback, .glance li.flag-bias, .glance li.flag-behind, .glance li.flag-narrow, .glance li.flag-filled, .glance li.flag-untested { border-color: currentColor; }
dl.marks { display: grid; grid-template-columns: max-content 1fr; gap: 6px 14px; margin: 0; }
dl.marks dd { margin: 0; }
section.series { border-top: 2px solid var(--line); margin-top: 34px; }
section.series h2 { display: flex; gap: 12px; align-items: baseline; flex-wrap: wrap; }
.top { font-size: 13px; margin-left: auto; }
.top a { color: var(--muted); }
.chartbox { background: #fff; border: 1px solid var(--line); border-radius: 8px; padding: 6px; }
svg.chart { display: block; width: 100%; height: auto; font-size: 12px; }
svg.chart .grid line { stroke: #ece8df; stroke-width: 1; }
svg.chart .grid line.axis, svg.chart .grid line.xt { stroke: #a7a195; }
svg.chart text { fill: var(--muted); }
svg.chart .legend text { fill: var(--ink); }
svg.chart text.empty { font-size: 15px; }
svg.chart .hist { fill: none; stroke: var(--ink); stroke-width: 1.6; }
svg.chart .hist.dot { fill: var(--ink); stroke: none; }
svg.chart .fit { fill: none; stroke: #8d96a8; stroke-width: 1.2; stroke-dasharray: 4 3; }
svg.chart .fit.dot { fill: #8d96a8; stroke: none; }
svg.chart .fc { fill: none; stroke: var(--teal); stroke-width: 2.2; }
svg.chart .fc.dot { fill: var(--teal); stroke: none; }
svg.chart .band { stroke: none; }
svg.chart .b0 { fill: #93d0c6; }
svg.chart .b1 { fill: #c3e5df; }
svg.chart .b2 { fill: #e0f1ee; }
svg.chart .b3 { fill: #eff8f6; }
svg.chart .origin { stroke: #a7a195; stroke-dasharray: 2 3; }
svg.chart circle.filled { fill: #fff; stroke: var(--amber); stroke-width: 2; }
.cols { display: grid; grid-template-columns: minmax(0, 1fr) minmax(0, 1fr); gap: 8px 28px; }
@media (max-width: 900px) { .cols { grid-template-columns: 1fr; } }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 3px 12px; margin: 0; }
dl.facts dt { color: var(--muted); }
dl.facts dd { margin: 0; }
.reason { border-left: 4px solid var(--red); background: #fdf3f2; padding: 8px 12px; margin: 10px 0; }
ul.plain { margin: 0; padding-left: 18px; }
table.small { font-size: 13.5px; width: auto; min-width: 60%; background: #fff; border: 1px solid var(--line); }
table.small th { background: #f3f1ea; }
table.small tr.used td { background: #eaf5f3; font-weight: 600; }
.tag { color: var(--muted); font-weight: 400; font-size: 12px; }
footer { color: var(--muted); font-size: 13px; margin-top: 40px; padding-bottom: 30px; }
[hidden] { display: none !important; }
</style>
</head>
<body>
<header>
<h1>{{.Title}}</h1>
{{if .About}}<p class="about">{{.About}}</p>{{end}}
<ul class="glance" id="glance">{{range .Glance}}<li{{if .Cls}} class="{{.Cls}}"{{end}}><b>{{.N}}</b>{{.What}}</li>{{end}}</ul>
</header>
<main>
<section id="all">
<h2>All series</h2>
<div class="tools">
<label>Find <input id="find" type="search" placeholder="series, model or method" autocomplete="off"/></label>
<label>Show <select id="only">
<option value="all" selected="selected">every series</option>
<option value="any">with any flag</option>
{{range .Marks}}<option value="{{.ID}}">{{.Label}}</option>
{{end}}</select></label>
<span id="shown" aria-live="polite">{{len .Rows}} of {{len .Rows}} shown</span>
</div>
<div class="wrap">
<table id="summary">
<caption hidden="hidden">Every series of the run; click a heading to sort</caption>
<thead><tr>
<th class="n" data-col="n"><button type="button" data-kind="num">#</button></th>
<th data-col="series"><button type="button" data-kind="text">Series</button></th>
<th data-col="status"><button type="button" data-kind="num">Status</button></th>
<th data-col="route"><button type="button" data-kind="text">Chosen by</button></th>
<th data-col="model"><button type="button" data-kind="text">Model</button></th>
<th class="n" data-col="error" title="mean absolute error in the backtest, scaled by the naive forecast's in-sample error"><button type="button" data-kind="num">Backtest error</button></th>
<th class="n" data-col="ratio" title="backtest error divided by the baseline benchmark's: below 1 beats it"><button type="button" data-kind="num">vs baseline</button></th>
{{range .Levels}}<th class="n" data-col="in-{{.}}" title="share of backtest outcomes inside the {{.}} band"><button type="button" data-kind="num">in {{.}} band</button></th>
{{end}}<th class="n" data-col="bias" title="Trigg's tracking signal, from -1 to +1; sorts by size, either sign"><button type="button" data-kind="num">Bias signal</button></th>
<th class="n" data-col="filled"><button type="button" data-kind="num">Filled</button></th>
<th data-col="flags"><button type="button" data-kind="num">Flags</button></th>
</tr></thead>
<tbody>
{{range .Rows}}<tr id="row-{{.ID}}" data-i="{{.N}}" data-sec="{{.ID}}" data-flags="{{.FlagIDs}}" data-find="{{.Find}}">
<td class="n" data-v="{{.N}}">{{.N}}</td>
<td data-v="{{.Key}}"><a href="#{{.ID}}">{{.Key}}</a></td>
<td data-v="{{.Status.Sort}}" class="{{.Status.Cls}}">{{.Status.Text}}</td>
<td data-v="{{.Route}}">{{.Route}}</td>
<td data-v="{{.Model}}" class="model">{{.Model}}</td>
{{template "cell" .MASE}}
{{template "cell" .Ratio}}
{{range .Coverage}}{{template "cell" .}}
{{end}}{{template "cell" .Bias}}
{{template "cell" .Filled}}
<td class="flags" data-v="{{len .Flags}}">{{range .Flags}}<span class="chip flag-{{.ID}}" title="{{.Means}}">{{.Label}}</span>{{end}}</td>
</tr>
{{end}}</tbody>
</table>
</div>
</section>
<section id="flags">
<h2>What the flags mean</h2>
<dl class="marks">
{{range .Marks}}<dt><span class="chip flag-{{.ID}}">{{.Label}}</span></dt><dd>{{.Means}}</dd>
{{end}}</dl>
<p>Backtest error is the mean absolute error of the forecasts made from past origins, divided by the in-sample error of the naive (or seasonal naive) forecast; "vs baseline" divides it by the same measure of the backtest's baseline benchmark, so below 1 the model beat the benchmark. The band columns give the share of past outcomes that fell inside each band. Numbers are rounded for reading; the data the page was made from hold the exact values.</p>
</section>
{{range .Rows}}<section class="series" id="{{.ID}}" data-row="row-{{.ID}}">
<h2>{{.Key}} {{range .Flags}}<span class="chip flag-{{.ID}}" title="{{.Means}}">{{.Label}}</span>{{end}}<span class="top"><a href="#all">back to the table</a></span></h2>
{{if .Reason}}<p class="reason"><b>No forecast.</b> {{.Reason}}</p>{{end}}
<div class="chartbox">{{.Chart}}</div>
<div class="cols">
<div>
<h3>How it was forecast</h3>
<dl class="facts">{{range .Facts}}<dt>{{.Label}}</dt><dd>{{.Value}}</dd>{{end}}</dl>
{{if .Members}}<h3>Models combined</h3><ul class="plain">{{range .Members}}<li class="model">{{.}}</li>{{end}}</ul>{{end}}
{{if .Fallbacks}}<h3>Fallbacks</h3><ul class="plain">{{range .Fallbacks}}<li>{{.}}</li>{{end}}</ul>{{end}}
{{if .Notes}}<h3>Notes</h3><ul class="plain">{{range .Notes}}<li>{{.}}</li>{{end}}</ul>{{end}}
{{if .Repairs}}<h3>Filled values</h3>
<table class="small"><thead><tr><th>period</th><th class="n">was</th><th class="n">filled with</th><th>why</th></tr></thead><tbody>
{{range .Repairs}}<tr><td>{{.When}}</td><td class="n">{{.Was}}</td><td class="n">{{.Now}}</td><td>{{.Why}}</td></tr>
{{end}}</tbody></table>{{end}}
</div>
<div>
<h3>Backtest</h3>
{{with .Backtest}}<p>{{.Summary}}</p>
{{range .Notes}}<p class="warn">{{.}}</p>{{end}}
<table class="small"><thead><tr><th>candidate</th><th class="n">error</th><th class="n">vs baseline</th>{{range .Levels}}<th class="n">in {{.}} band</th>{{end}}<th class="n">mean error</th><th class="n">abs error</th></tr></thead><tbody>
{{range .Runs}}<tr{{if .Used}} class="used"{{end}}><td>{{.Name}}{{if .Tag}} <span class="tag">({{.Tag}})</span>{{end}}{{if .Failed}}<br/><span class="warn">failed at {{.Failed}}</span>{{end}}</td><td class="n">{{.MASE}}</td><td class="n">{{.Ratio}}</td>{{range .Coverage}}<td class="n">{{.}}</td>{{end}}<td class="n">{{.Bias}}</td><td class="n">{{.MAE}}</td></tr>
{{end}}</tbody></table>
<p class="tag">mean error: actual minus forecast, averaged (positive: the forecasts ran low); abs error: mean absolute error, in the data's units.</p>
{{else}}<p>{{if .BacktestErr}}Not backtested: {{.BacktestErr}}{{else}}No backtest was run for this series.{{end}}</p>{{end}}
{{if and .Backtest .BacktestErr}}<p class="warn">Left out of the backtest summary: {{.BacktestErr}}</p>{{end}}
</div>
</div>
</section>
{{end}}</main>
<footer>Written by almanac's review page writer. Forecasts are uncertain: read the bands, not just the lines, and check the backtest before relying on a series.</footer>
<script>{{.Script}}</script>
</body>
</html>
{{define "cell"}}<td class="n{{if .Cls}} {{.Cls}}{{end}}" data-v="{{.Sort}}"{{if .Tip}} title="{{.Tip}}"{{end}}>{{.Text}}</td>{{end}}`))

// reviewScript sorts and filters the summary table. Plain JavaScript of
// 2015 vintage, no library. Rows keep their data-i (input position) as
// the tie-breaker, so sorting is stable and a second click reverses it.
const reviewScript = `//<![CDATA[
(function () {
  "use strict";
  var table = document.getElementById("summary");
  var body = table.tBodies[0];
  var rows = Array.prototype.slice.call(body.rows);
  var find = document.getElementById("find");
  var only = document.getElementById("only");
  var shown = document.getElementById("shown");
  var heads = Array.prototype.slice.call(table.tHead.rows[0].cells);
  var sorted = { col: -1, dir: 1 };

  function hasFlag(row, f) {
    var flags = row.getAttribute("data-flags");
    if (f === "all") { return true; }
    if (f === "any") { return flags !== ""; }
    return (" " + flags + " ").indexOf(" " + f + " ") >= 0;
  }

  function filter() {
    var q = find.value.trim().toLowerCase();
    var f = only.value;
    var n = 0;
    rows.forEach(function (row) {
      var ok = hasFlag(row, f) && (q === "" || row.getAttribute("data-find").indexOf(q) >= 0);
      row.hidden = !ok;
      var sec = document.getElementById(row.getAttribute("data-sec"));
      if (sec) { sec.hidden = !ok; }
      if (ok) { n++; }
    });
    shown.textContent = n + " of " + rows.length + " shown";
  }

  function sortBy(col, kind) {
    sorted.dir = sorted.col === col ? -sorted.dir : 1;
    sorted.col = col;
    var keyed = rows.map(function (row) {
      return { row: row, v: row.cells[col].getAttribute("data-v"), i: Number(row.getAttribute("data-i")) };
    });
    keyed.sort(function (a, b) {
      var ea = a.v === null || a.v === "", eb = b.v === null || b.v === "";
      if (ea || eb) {
        if (ea === eb) { return a.i - b.i; }
        return ea ? 1 : -1; // values missing go last either way
      }
      var c = kind === "num" ? Number(a.v) - Number(b.v) : a.v.localeCompare(b.v);
      return c !== 0 ? c * sorted.dir : a.i - b.i;
    });
    keyed.forEach(function (k) { body.appendChild(k.row); });
    heads.forEach(function (th, k) {
      if (k === col) {
        th.setAttribute("aria-sort", sorted.dir > 0 ? "ascending" : "descending");
      } else {
        th.removeAttribute("aria-sort");
      }
    });
  }

  heads.forEach(function (th, col) {
    var b = th.querySelector("button");
    if (b) {
      b.addEventListener("click", function () { sortBy(col, b.getAttribute("data-kind")); });
    }
  });
  find.addEventListener("input", filter);
  only.addEventListener("change", filter);
  filter();
})();
//]]>`
