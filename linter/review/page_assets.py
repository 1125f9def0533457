"""The review page's inline style sheet and its one small script (no framework, nothing fetched).

The script filters the findings table by rule, rail and severity. Each filter is a row of
toggle buttons; the state also lives in the address as ``#filter=rule:ID,rail:NAME,severity:LEVEL``
so that a filtered view can be linked to, and the page applies such an address when it loads.
Hidden rows get the ``hidden`` attribute, which a saved or dumped page still shows.
"""

from __future__ import annotations

STYLE = """
:root { --fail: #d55e00; --thin: #cc79a7; --ok: #0072b2; --ink: #1a1a1a; --muted: #555; --rule: #d0d0d0; }
* { box-sizing: border-box; }
body { font-family: "DejaVu Sans", "Segoe UI", Helvetica, Arial, sans-serif; color: var(--ink); margin: 0;
       line-height: 1.45; background: #fff; }
header, main, footer { max-width: 1100px; margin: 0 auto; padding: 0 1.2rem; }
header { padding-top: 1.2rem; }
h1 { font-size: 1.6rem; margin: 0.2rem 0; }
h2 { font-size: 1.3rem; border-bottom: 2px solid var(--ink); padding-bottom: 0.2rem; margin-top: 2.2rem; }
h3 { font-size: 1.05rem; margin: 1.4rem 0 0.4rem; }
code { font-family: "DejaVu Sans Mono", Consolas, monospace; font-size: 0.88em; overflow-wrap: anywhere; }
nav ol { display: flex; flex-wrap: wrap; gap: 0.3rem 1.6rem; list-style: none; padding: 0; margin: 0.6rem 0;
         counter-reset: section; }
nav li { counter-increment: section; }
nav li::before { content: counter(section) ". "; }
table { border-collapse: collapse; margin: 0.4rem 0 0.8rem; font-size: 0.9rem; }
th, td { border: 1px solid var(--rule); padding: 0.25rem 0.5rem; text-align: left; vertical-align: top; }
thead th { background: #f0f0f0; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
.meta { color: var(--muted); margin: 0.1rem 0; }
.caution { border-left: 6px solid var(--fail); background: #fff4ec; padding: 0.6rem 0.9rem; margin: 0.8rem 0; }
.totals { font-size: 1.05rem; font-weight: bold; }
.badge { display: inline-block; min-width: 4.2em; text-align: center; font-weight: bold; font-size: 0.8rem;
         border-radius: 3px; padding: 0 0.35rem; border: 2px solid currentColor; }
.badge.fail, .sev-error { color: var(--fail); }
.badge.thin, .sev-warning { color: #8a3f6b; }
.badge.ok, .badge.requested, .sev-note { color: var(--ok); }
.sev { font-weight: bold; text-transform: uppercase; font-size: 0.8rem; }
tr.verdict-fail td.verdict { color: var(--fail); font-weight: bold; }
tr.verdict-thin td.verdict { color: #8a3f6b; font-weight: bold; }
figure.level-diagram { margin: 1.2rem 0 2rem; padding: 0.6rem 0.8rem; border: 1px solid var(--rule); }
figure.level-diagram:target { outline: 3px solid var(--ok); }
figure.level-diagram figcaption h3 { margin-top: 0.2rem; }
svg * { stroke-linejoin: round; stroke-linecap: butt; }
figure.level-diagram svg { width: 100%; max-width: 980px; height: auto; display: block; }
.picture svg { max-width: 100%; height: auto; display: block; }
.filters { display: grid; grid-template-columns: max-content 1fr; gap: 0.3rem 0.8rem; align-items: baseline;
           margin: 0.6rem 0; }
.filters .label { font-weight: bold; }
.filters button { font: inherit; font-size: 0.85rem; margin: 0 0.3rem 0.3rem 0; padding: 0.1rem 0.55rem;
                  border: 1px solid #888; border-radius: 12px; background: #fff; cursor: pointer; }
.filters button[aria-pressed="true"] { background: var(--ink); color: #fff; border-color: var(--ink); }
.filters button[aria-pressed="true"]::before { content: "\\2713  "; }
#findings-shown { font-weight: bold; }
#findings-table td.message { max-width: 30rem; }
details summary { cursor: pointer; }
ul.sites { margin: 0.2rem 0; padding-left: 1.1rem; }
footer { margin: 2.5rem auto 2rem; color: var(--muted); font-size: 0.85rem; }
@media print { .filters, nav { display: none; } figure.level-diagram { break-inside: avoid; } }
"""

SCRIPT = """
(function () {
  "use strict";
  var table = document.getElementById("findings-table");
  if (!table || !table.tBodies.length) { return; }
  var rows = Array.prototype.slice.call(table.tBodies[0].rows);
  var buttons = Array.prototype.slice.call(document.querySelectorAll("button[data-filter-kind]"));
  var shown = document.getElementById("findings-shown");
  var kinds = ["rule", "rail", "severity"];
  var active = { rule: "", rail: "", severity: "" };

  function matches(row) {
    if (active.rule && row.getAttribute("data-rule") !== active.rule) { return false; }
    if (active.severity && row.getAttribute("data-severity") !== active.severity) { return false; }
    var rails = " " + row.getAttribute("data-rails") + " ";
    return !active.rail || rails.indexOf(" " + active.rail + " ") >= 0;
  }
  function describe() {
    return kinds.filter(function (k) { return active[k]; })
                .map(function (k) { return k + ":" + active[k]; }).join(",");
  }
  function apply() {
    var count = 0;
    rows.forEach(function (row) {
      var keep = matches(row);
      row.hidden = !keep;
      if (keep) { count += 1; }
    });
    buttons.forEach(function (b) {
      var on = active[b.getAttribute("data-filter-kind")] === b.getAttribute("data-filter-value");
      b.setAttribute("aria-pressed", on ? "true" : "false");
    });
    shown.textContent = count + " of " + rows.length + " findings shown";
    document.body.setAttribute("data-filter", describe());
  }
  function fromAddress() {
    var text = decodeURIComponent(window.location.hash.slice(1));
    if (text.indexOf("filter=") !== 0) { return false; }
    active = { rule: "", rail: "", severity: "" };
    text.slice(7).split(",").forEach(function (part) {
      var colon = part.indexOf(":");
      var kind = part.slice(0, colon);
      if (colon > 0 && kinds.indexOf(kind) >= 0) { active[kind] = part.slice(colon + 1); }
    });
    return true;
  }
  buttons.forEach(function (b) {
    b.addEventListener("click", function () {
      var kind = b.getAttribute("data-filter-kind");
      var value = b.getAttribute("data-filter-value");
      active[kind] = active[kind] === value ? "" : value;
      apply();
      var state = describe();
      try {
        window.history.replaceState(null, "", state ? "#filter=" + encodeURIComponent(state) : "#findings");
      } catch (ignored) { /* some viewers forbid changing a file address; the filter still works */ }
    });
  });
  window.addEventListener("hashchange", function () {
    if (fromAddress()) { apply(); document.getElementById("findings").scrollIntoView(); }
  });
  fromAddress();
  apply();
})();
"""
