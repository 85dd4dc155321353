/**
 * The report: one self-contained HTML file (inline CSS, inline SVG, a small inline script for
 * hover read-outs; no fonts, images, scripts or styles from anywhere else, and a content
 * security policy that forbids fetching them) that opens offline and prints on A4.
 */
import { flatFields } from './table.js';
import type { ReportInput } from '../transient/report-input.js';
import { display, type DisplayKind } from '../units/display.js';
import { reportFigures, type Figure } from './plots.js';
import { chamberStyles, channel, flowPaths, netTransfers } from './report-data.js';
import { markerSvg, type SeriesStyle } from './svg-chart.js';
import { esc, sigText, tag } from './svg.js';

const CSS = `
:root { --ink:#1a1a1a; --muted:#5c5c5c; --line:#dadada; --pass:#17692f; --fail:#a4161a; --warn:#8a5a00; --paper:#ffffff; }
* { box-sizing: border-box; }
html { background: #f3f3f0; }
body { margin: 0; color: var(--ink); font: 15px/1.5 system-ui, -apple-system, 'Segoe UI', Roboto, 'Helvetica Neue', Arial, 'DejaVu Sans', sans-serif; }
main { max-width: 1080px; margin: 0 auto; padding: 28px 36px 56px; background: var(--paper); }
h1 { font-size: 26px; line-height: 1.25; margin: 0 0 6px; }
h2 { font-size: 19px; margin: 34px 0 10px; padding-bottom: 4px; border-bottom: 2px solid var(--ink); }
h3 { font-size: 15.5px; margin: 18px 0 6px; }
p { margin: 6px 0; }
.meta { color: var(--muted); font-size: 13.5px; }
.job { font-size: 15px; max-width: 70ch; margin-top: 10px; }
.badge { display: inline-block; padding: 1px 10px; border-radius: 11px; font-weight: 700; font-size: 13px; vertical-align: 3px; margin-left: 6px; }
.badge.ok { background: #e2f1e6; color: var(--pass); border: 1px solid #9fcfaa; }
.badge.bad { background: #f8e3e3; color: var(--fail); border: 1px solid #e3a5a5; }
nav.toc { margin: 14px 0 0; font-size: 13.5px; }
nav.toc a { color: #0b5394; text-decoration: none; margin-right: 14px; white-space: nowrap; }
ul.findings { padding-left: 20px; margin: 8px 0 12px; }
ul.findings li { margin: 3px 0; }
figure { margin: 16px 0 22px; break-inside: avoid; page-break-inside: avoid; }
figure svg { display: block; width: 100%; height: auto; max-width: 100%; border: 1px solid var(--line); border-radius: 4px; background: #fff; }
figure svg.plenum-diagram { width: auto; margin: 0 auto; }
figcaption { font-size: 13.5px; color: var(--muted); margin-top: 6px; max-width: 90ch; }
table { border-collapse: collapse; width: 100%; font-size: 13.5px; font-variant-numeric: tabular-nums; margin: 6px 0 12px; }
th, td { padding: 4px 8px; border-bottom: 1px solid var(--line); text-align: right; vertical-align: top; }
td { white-space: nowrap; }
td:first-child { white-space: nowrap; }
td.text, td.text:first-child { white-space: normal; overflow-wrap: anywhere; }
th { background: #f4f4f2; font-weight: 650; border-bottom: 1.5px solid #9a9a9a; }
th:first-child, td:first-child, td.text, th.text { text-align: left; }
td .sw { vertical-align: -3px; margin-right: 6px; }
.pass { color: var(--pass); font-weight: 700; }
.fail { color: var(--fail); font-weight: 700; }
ol.events { padding-left: 0; list-style: none; font-size: 14px; }
ol.events li { display: grid; grid-template-columns: 3.2em 6.5em 1fr; gap: 8px; padding: 2px 0; border-bottom: 1px dotted var(--line); }
ol.events .n { font-weight: 700; text-align: right; }
ol.events .t { font-variant-numeric: tabular-nums; color: var(--muted); }
ol.events li.warn { color: var(--fail); }
.warnings li { color: var(--warn); }
.safety { border-left: 5px solid #e69f00; background: #fff7e3; padding: 10px 16px; margin: 10px 0; }
.safety p { margin: 6px 0; }
pre.netlist { background: #f7f7f5; border: 1px solid var(--line); border-radius: 4px; padding: 12px 14px; overflow: auto; font: 12.5px/1.45 ui-monospace, 'SFMono-Regular', Menlo, Consolas, 'DejaVu Sans Mono', monospace; }
footer { margin-top: 36px; color: var(--muted); font-size: 12.5px; }
.readout { position: absolute; z-index: 10; pointer-events: none; display: none; background: rgba(255,255,255,0.97); border: 1px solid #8a8a8a; border-radius: 4px; padding: 4px 9px; font-size: 12.5px; line-height: 1.45; box-shadow: 0 2px 8px rgba(0,0,0,0.18); white-space: nowrap; font-variant-numeric: tabular-nums; }
.readout .row::before { content: ''; display: inline-block; width: 9px; height: 9px; margin-right: 6px; border-radius: 2px; background: var(--c, transparent); }
@media (max-width: 700px) { main { padding: 16px; } }
@media print {
  @page { size: A4; margin: 14mm 12mm; }
  html, body { background: #fff; font-size: 10.5pt; }
  main { max-width: none; padding: 0; }
  nav.toc, .readout { display: none !important; }
  h2 { break-after: avoid; page-break-after: avoid; margin-top: 18pt; }
  figure { break-inside: avoid; page-break-inside: avoid; }
  figure svg { border: none; }
  table, ol.events li { break-inside: avoid; }
  pre.netlist { white-space: pre-wrap; font-size: 8.5pt; border: none; }
  a { color: inherit; text-decoration: none; }
}
`;

/** Hover read-out: reads the drawn paths back into values through the axis ranges the SVG carries. */
const SCRIPT = `
(function () {
  'use strict';
  var tip = document.createElement('div');
  tip.className = 'readout';
  document.body.appendChild(tip);
  var NS = 'http://www.w3.org/2000/svg';
  function nums(s) { return String(s || '').split(' ').map(Number); }
  function fmt(v) { if (!isFinite(v)) return '-'; var a = Math.abs(v); return a !== 0 && (a < 1e-3 || a >= 1e6) ? v.toExponential(3) : String(Number(v.toPrecision(4))); }
  function parse(d) { var out = [], re = /(-?[0-9.]+),(-?[0-9.]+)/g, m; while ((m = re.exec(d))) out.push([+m[1], +m[2]]); return out; }
  function yAt(pts, x) {
    if (!pts.length || x < pts[0][0] || x > pts[pts.length - 1][0]) return null;
    var lo = 0, hi = pts.length - 1;
    while (hi - lo > 1) { var mid = (lo + hi) >> 1; if (pts[mid][0] <= x) lo = mid; else hi = mid; }
    var a = pts[lo], b = pts[hi];
    return b[0] === a[0] ? a[1] : a[1] + (x - a[0]) / (b[0] - a[0]) * (b[1] - a[1]);
  }
  function hide() { tip.style.display = 'none'; }
  Array.prototype.forEach.call(document.querySelectorAll('svg.plenum-chart'), function (svg) {
    var plot = nums(svg.getAttribute('data-plot')), xd = nums(svg.getAttribute('data-x')), yd = nums(svg.getAttribute('data-y'));
    var kind = svg.getAttribute('data-kind'), xl = svg.getAttribute('data-xlabel'), yl = svg.getAttribute('data-ylabel');
    var series = Array.prototype.map.call(svg.querySelectorAll('path.series'), function (p) {
      return { name: p.getAttribute('data-name'), color: p.getAttribute('stroke'), pts: parse(p.getAttribute('d')) };
    });
    var cross = document.createElementNS(NS, 'line');
    cross.setAttribute('stroke', '#333'); cross.setAttribute('stroke-width', '1'); cross.setAttribute('stroke-dasharray', '3 3');
    cross.setAttribute('visibility', 'hidden'); cross.setAttribute('pointer-events', 'none');
    svg.appendChild(cross);
    function dx(px) { return xd[0] + (px - plot[0]) / plot[2] * (xd[1] - xd[0]); }
    function dy(py) { return yd[0] + (plot[1] + plot[3] - py) / plot[3] * (yd[1] - yd[0]); }
    function row(text, color) { var r = document.createElement('div'); r.className = 'row'; if (color) r.style.setProperty('--c', color); r.textContent = text; tip.appendChild(r); }
    svg.addEventListener('mousemove', function (ev) {
      var m = svg.getScreenCTM(); if (!m) return;
      var pt = svg.createSVGPoint(); pt.x = ev.clientX; pt.y = ev.clientY;
      var p = pt.matrixTransform(m.inverse());
      if (p.x < plot[0] || p.x > plot[0] + plot[2] || p.y < plot[1] || p.y > plot[1] + plot[3]) { hide(); cross.setAttribute('visibility', 'hidden'); return; }
      tip.textContent = '';
      if (kind === 'time') {
        cross.setAttribute('x1', p.x); cross.setAttribute('x2', p.x); cross.setAttribute('y1', plot[1]); cross.setAttribute('y2', plot[1] + plot[3]);
        cross.setAttribute('visibility', 'visible');
        row(xl + ': ' + fmt(dx(p.x)));
        series.forEach(function (s) { var y = yAt(s.pts, p.x); if (y !== null) row(s.name + ': ' + fmt(dy(y)) + ' ' + yl.replace(/^.*\\[(.*)\\]$/, '$1'), s.color); });
      } else {
        row(xl + ': ' + fmt(dx(p.x)));
        row(yl + ': ' + fmt(dy(p.y)));
      }
      tip.style.display = 'block';
      tip.style.left = (ev.pageX + 14) + 'px';
      tip.style.top = (ev.pageY + 14) + 'px';
    });
    svg.addEventListener('mouseleave', function () { hide(); cross.setAttribute('visibility', 'hidden'); });
  });
})();
`;

// ---- helpers --------------------------------------------------------------------------------

function h(name: string, attrs: Record<string, string | undefined>, ...children: string[]): string {
  return tag(name, attrs, ...children).replace(/\/>$/, `></${name}>`);
}

/** The leading comment block of a netlist (its author's description), without editor directives. */
export function netlistDescription(source: string): string {
  const out: string[] = [];
  for (const raw of source.split(/\r?\n/)) {
    const line = raw.trim();
    if (!line.startsWith('#')) break;
    const body = line.replace(/^#+\s?/, '');
    if (/^yaml-language-server:/.test(body)) continue;
    out.push(body);
  }
  return out.join(' ').replace(/\s+/g, ' ').trim();
}

function swatch(style: SeriesStyle): string {
  return tag('svg', { class: 'sw', width: 30, height: 14, viewBox: '0 0 30 14', 'aria-hidden': 'true' },
    tag('line', { x1: 1, y1: 7, x2: 29, y2: 7, stroke: style.color, 'stroke-width': 2, 'stroke-dasharray': style.dash || undefined }),
    markerSvg(style.marker, 15, 7, 3.6, style.color, true));
}

function table(head: string[], rows: string[][], textCols: number[] = []): string {
  const th = head.map((x, i) => h('th', { class: textCols.includes(i) ? 'text' : undefined, scope: 'col' }, esc(x))).join('');
  const tr = rows.map((r) => h('tr', {}, ...r.map((c, i) => h('td', { class: textCols.includes(i) ? 'text' : undefined }, c)))).join('\n');
  return h('table', {}, h('thead', {}, h('tr', {}, th)), h('tbody', {}, tr));
}

/** Display kinds of probe quantities, for an expectation's actual value. */
const QUANTITY_KIND: Record<string, DisplayKind> = {
  pressure: 'pressure', gauge: 'gauge', volume: 'volume', mass: 'mass', temperature: 'temperature',
  stretch: 'stretch', flow: 'flow', reynolds: 'reynolds',
};

/** An expectation's actual value in its probe's unit (a settles deviation in %), not raw SI. */
function actualText(x: number, quantity: string | undefined): string {
  if (!Number.isFinite(x)) return String(x);
  if (quantity === 'fraction') return `${sigText(100 * x, 3)} %`;
  const kind = quantity ? QUANTITY_KIND[quantity] : undefined;
  return kind ? display(x, kind) : sigText(x, 4);
}

/** A gauge pressure as a number of kPa (the column heading carries the unit). */
function gauge(p: number): string { return esc(display(p, 'gauge').replace(' kPa gauge', '')); }

/** Sentences for the top of the report: what happened and where the gas went. */
function findings(input: ReportInput): string[] {
  const r = input.result;
  const out: string[] = [];
  out.push(r.status === 'completed'
    ? `The run completed: ${esc(display(r.end, 'time'))} simulated.`
    : `<span class="fail">The run failed</span> at t = ${esc(display(r.end, 'time'))}: ${esc(r.message)}. Everything below covers the time up to the failure.`);
  const changes = input.topology.chambers.map((c) => {
    const m0 = channel(input, `${c.name}.mass`)?.[0] ?? Number.NaN;
    const m1 = r.chambers[c.name]?.final.mass ?? Number.NaN;
    return { name: c.name, dm: m1 - m0, rel: (m1 - m0) / m0 };
  }).filter((c) => Number.isFinite(c.dm)).sort((a, b) => Math.abs(b.dm) - Math.abs(a.dm));
  const gained = changes.filter((c) => c.rel > 1e-3);
  const lost = changes.filter((c) => c.rel < -1e-3);
  const one = (c: (typeof changes)[number]): string => `<b>${esc(c.name)}</b> ${esc(display(Math.abs(c.dm), 'mass'))} (${c.rel > 0 ? '+' : '−'}${esc(sigText(Math.abs(100 * c.rel), 2))} %)`;
  // a few by name; many as a group with their range, the extremes named (a 300-chamber chain
  // would otherwise list every chamber)
  const who = (l: typeof changes, verb: string): string => {
    if (l.length <= FEW) return `${l.map(one).join(', ')} ${verb} gas`;
    const pcts = l.map((c) => Math.abs(100 * c.rel));
    const total = l.reduce((s, c) => s + Math.abs(c.dm), 0);
    const range = `${sigText(Math.min(...pcts), 2)}–${sigText(Math.max(...pcts), 2)} % each`;
    return `${l.length} chambers ${verb} ${esc(display(total, 'mass'))} of gas in all (${range}); the most by mass ${l.slice(0, 2).map(one).join(', ')}, the least ${one(l[l.length - 1]!)}`;
  };
  if (gained.length || lost.length) {
    out.push(`Where the gas went: ${lost.length ? who(lost, 'lost') : 'no chamber lost gas'}; ${gained.length ? who(gained, 'gained') : 'no chamber gained gas'}.`);
  } else {
    out.push('No chamber\'s gas mass changed by more than 0.1 %.');
  }
  const through = r.mass.through_boundaries;
  if (Math.abs(through) > 1e-6 * Math.max(r.mass.initial, 1e-12)) {
    out.push(`Net ${through > 0 ? 'into' : 'out of'} the network through reservoirs and feeds: ${esc(display(Math.abs(through), 'mass'))}.`);
  }
  const transfers = netTransfers(input);
  const paths = flowPaths(input);
  const big = paths.map((p) => ({ p, m: transfers.get(p.name) ?? 0 })).sort((a, b) => Math.abs(b.m) - Math.abs(a.m))[0];
  if (big && Math.abs(big.m) > 0) {
    const [a, b] = big.m > 0 ? [big.p.from, big.p.to] : [big.p.to, big.p.from];
    out.push(`The largest net transfer: ${esc(display(Math.abs(big.m), 'mass'))} through <b>${esc(big.p.label)}</b>, from ${esc(a)} to ${esc(b)}.`);
  }
  out.push(...maximumFindings(input, changes));
  const ex = r.expectations;
  if (ex.length) {
    const failed = ex.filter((e) => !e.passed);
    out.push(failed.length
      ? `<span class="fail">${failed.length} of ${ex.length} expectations failed</span>: ${failed.map((e) => esc(e.name)).join('; ')}.`
      : `<span class="pass">All ${ex.length} expectations passed.</span>`);
  }
  out.push(...outcomeFindings(r));
  if (r.warnings.length) out.push(`<span class="fail">${r.warnings.length} warning${r.warnings.length === 1 ? '' : 's'}</span>, listed under Warnings and safety.`);
  return out;
}

/** How the run ended, group by group (`plenum run`'s outcome line); many groups counted by outcome. */
function outcomeFindings(r: ReportInput['result']): string[] {
  const groups = r.outcomes ?? [];
  if (!groups.length || r.status !== 'completed') return [];
  const label = (g: (typeof groups)[number]): string => {
    const names = g.chambers.length <= 4 ? g.chambers.join(', ') : `${g.chambers[0]} … ${g.chambers[g.chambers.length - 1]} (${g.chambers.length} chambers)`;
    const what = g.outcome === 'settled' ? `settled within ${sigText(100 * g.band, 2)} % by ${display(g.settling_time ?? 0, 'time')}`
      : g.outcome === 'oscillating' ? `oscillating (period ≈ ${display(g.period ?? 0, 'time')})`
        : g.outcome === 'diverging' ? `diverging (growth rate ${sigText(g.growth_rate ?? 0, 3)} 1/s)` : 'still moving at the end';
    return `${esc(names)} (${g.closed ? 'closed' : 'open'}): ${esc(what)}`;
  };
  if (groups.length <= FEW) return [`How it ended: ${groups.map(label).join('; ')}.`];
  const counts = new Map<string, number>();
  for (const g of groups) counts.set(g.outcome, (counts.get(g.outcome) ?? 0) + 1);
  return [`How it ended: ${groups.length} groups of chambers, ${[...counts.entries()].map(([o, n]) => `${n} ${o === 'moving' ? 'still moving' : o}`).join(', ')}.`];
}

/** Chambers named one by one in a finding; more are grouped and counted. */
const FEW = 5;

/** One chamber's sentence of a finding, and the phrase it shares with chambers that behave alike. */
interface Finding { name: string; how: string; text: string }

/**
 * Up to FEW findings as they are; more grouped by what they say: `150 chambers stay past the
 * pressure maximum of their wall law (s1, s3, …, s299)`, at most three names and the last.
 */
function grouped(items: Finding[]): string {
  if (items.length <= FEW) return items.map((f) => f.text).join('; ');
  const byHow = new Map<string, string[]>();
  for (const f of items) byHow.set(f.how, [...(byHow.get(f.how) ?? []), f.name]);
  return [...byHow.entries()].map(([how, names]) => {
    const shown = names.length <= 4 ? names : [...names.slice(0, 3), '…', names[names.length - 1]!];
    const phrase = how.replace(/\bits\b/g, 'their').replace(/^stays\b/, 'stay').replace(/^starts\b/, 'start').replace(/^ends\b/, 'end').replace(/^goes\b/, 'go').replace(/and ends\b/, 'and end').replace(/and comes\b/, 'and come');
    return names.length === 1 ? items.find((f) => f.name === names[0])!.text : `${names.length} chambers ${phrase} (${shown.map((n) => (n === '…' ? n : `<b>${esc(n)}</b>`)).join(', ')})`;
  }).join('; ');
}

/**
 * Why, when a wall law has a pressure maximum: which chambers were past it, and whether the
 * run ran away (a chamber past its maximum grew at falling pressure, drawing gas from another)
 * or came to rest below it.
 */
function maximumFindings(input: ReportInput, changes: { name: string; dm: number; rel: number }[]): string[] {
  const out: string[] = [];
  const crossings: Finding[] = [];
  const runaway: Finding[] = [];
  let everPast = false;
  let allEndBelow = true;
  for (const w of input.walls) {
    const max = w.extrema.find((e) => e.kind === 'max');
    if (!max) continue;
    const x = channel(input, `${w.chamber}.${w.axis}`);
    const g = channel(input, `${w.chamber}.gauge`);
    if (!x || !x.length || !g) continue;
    const fmtX = (v: number): string => (w.axis === 'stretch' ? `λ ${sigText(v, 3)}` : display(v, 'volume'));
    const x0 = x[0], x1 = x[x.length - 1];
    const peak = x.reduce((a, v) => (v > a ? v : a), -Infinity);
    const past0 = x0 > max.x, past1 = x1 > max.x;
    if (past1) allEndBelow = false;
    if (!(past0 || past1 || peak > max.x)) continue;
    everPast = true;
    const how = past0 && past1 ? 'stays past' : past0 ? 'starts past, and ends below,' : past1 ? 'ends past' : 'goes past, and comes back below,';
    crossings.push({ name: w.chamber, how: `${how} the pressure maximum of its wall law`, text: `<b>${esc(w.chamber)}</b> ${how} the pressure maximum of its wall law (${esc(display(max.gauge, 'gauge'))} at ${esc(fmtX(max.x))}): ${esc(fmtX(x0))} → ${esc(fmtX(x1))}` });
    const gained = changes.find((c) => c.name === w.chamber);
    if (past1 && gained && gained.rel > 1e-3 && g[g.length - 1] < g[0]) {
      const donor = changes.filter((c) => c.rel < -1e-3)[0];
      runaway.push({ name: w.chamber, how: 'took gas while past their maximum, so their pressure fell as they grew', text: `<b>${esc(w.chamber)}</b> took gas while past its maximum, so its pressure fell as it grew${donor ? ` and it kept drawing gas from <b>${esc(donor.name)}</b>` : ''}` });
    }
  }
  if (crossings.length) out.push(`${grouped(crossings)}.`);
  const chart = input.walls.some((w) => w.axis === 'stretch') ? 'pressure–stretch' : 'pressure–volume';
  if (runaway.length) {
    out.push(`Why: ${grouped(runaway)}. Chambers past their pressure maximum do not share gas evenly: see the ${chart} chart.`);
  } else if (everPast && allEndBelow) {
    out.push(`Why: every chamber ends below its pressure maximum, where a chamber's pressure rises as it fills, so connected chambers come to rest at a common pressure: see the ${chart} chart.`);
  }
  return out;
}

function figureHtml(f: Figure): string {
  return h('figure', { id: `fig-${f.id}`, 'data-series': String(f.series) }, f.svg, h('figcaption', {}, esc(f.caption)));
}

function chamberTable(input: ReportInput): string {
  const r = input.result;
  const styles = chamberStyles(input);
  const withT = input.heat !== 'isothermal';
  const head = ['chamber', 'wall', 'start [kPa]', 'end [kPa]', 'peak [kPa] (at)', 'least [kPa] (at)', 'size start → end', 'mass start → end'];
  if (withT) head.push('end temperature');
  const rows = input.topology.chambers.map((c) => {
    const s = r.chambers[c.name];
    const g0 = channel(input, `${c.name}.gauge`)?.[0] ?? Number.NaN;
    const m0 = channel(input, `${c.name}.mass`)?.[0] ?? Number.NaN;
    const size = c.sphere
      ? `λ ${sigText(channel(input, `${c.name}.stretch`)?.[0] ?? Number.NaN, 4)} → ${sigText(s?.final.stretch ?? Number.NaN, 4)}`
      : c.rigid ? esc(display(s?.final.volume ?? Number.NaN, 'volume'))
        : `${esc(display(channel(input, `${c.name}.volume`)?.[0] ?? Number.NaN, 'volume'))} → ${esc(display(s?.final.volume ?? Number.NaN, 'volume'))}`;
    const row = [
      `${swatch(styles.get(c.name)!)}<b>${esc(c.name)}</b>`,
      esc(c.describe),
      gauge(g0),
      s ? gauge(s.final.gauge) : '–',
      s ? `${gauge(s.peak.gauge)} (${esc(display(s.peak.at, 'time'))})` : '–',
      s ? `${gauge(s.least.gauge)} (${esc(display(s.least.at, 'time'))})` : '–',
      size,
      `${esc(display(m0, 'mass'))} → ${esc(display(s?.final.mass ?? Number.NaN, 'mass'))}`,
    ];
    if (withT) row.push(esc(display(s?.final.temperature ?? Number.NaN, 'temperature')));
    return row;
  });
  return `${table(head, rows, [0, 1])}<p class="meta">Pressures are gauge (above ambient).</p>`;
}

function pathTable(input: ReportInput): string {
  const r = input.result;
  const transfers = netTransfers(input);
  const valves = new Map(input.topology.valves.map((v) => [v.name, v] as const));
  const lines = new Map(input.topology.lines.map((l) => [l.name, l] as const));
  const rows = flowPaths(input).map((p) => {
    const l = lines.get(p.name);
    const v = valves.get(p.name);
    const desc = l ? [l.describe, ...l.valves.map((n) => `${n}: ${valves.get(n)?.describe ?? ''}`)].join('; ') : v?.describe ?? '';
    const ls = r.lines[p.name];
    const valveNames = l ? l.valves : [p.name];
    const choked = valveNames.some((n) => r.valves[n]?.choked);
    const peak = ls?.peak_flow ?? r.valves[p.name]?.peak_flow ?? Number.NaN;
    const net = transfers.get(p.name) ?? 0;
    return [
      `<b>${esc(p.label)}</b><br><span class="meta">${esc(p.from)} → ${esc(p.to)}</span>`,
      esc(desc),
      esc(display(peak, 'flow')),
      `${esc(display(Math.abs(net), 'mass'))} ${net > 0 ? '→' : net < 0 ? '←' : ''}`,
      ls ? `${esc(sigText(ls.peak_reynolds, 3))} (${ls.regime})` : '–',
      valveNames.length ? (choked ? 'yes' : 'no') : '–',
    ];
  });
  return rows.length ? table(['path', 'element', 'peak flow (+ from → to)', 'net moved', 'peak Re (regime)', 'choked'], rows, [0, 1]) : '<p>No lines or valves.</p>';
}

function boundaryTable(input: ReportInput): string {
  const rows: string[][] = [];
  for (const res of input.topology.reservoirs) rows.push([`<b>${esc(res.name)}</b>`, res.ambient ? 'ambient' : 'reservoir', esc(res.describe)]);
  for (const f of input.topology.feeds) rows.push([`<b>${esc(f.name)}</b>`, 'feed', `${esc(f.describe)} into ${esc(f.into)}`]);
  return rows.length ? table(['boundary', 'kind', 'pressure or rate'], rows, [0, 1, 2]) : '';
}

function safetyNotes(): string {
  return h('div', { class: 'safety' },
    h('p', {}, '<b>Compressed gas stores energy.</b> A vessel of one litre at six bar gauge holds on the order of a kilojoule, released at once when a wall, seam or fitting fails; flying fragments and whipping hoses injure.'),
    h('p', {}, '<b>Elastic chambers burst.</b> Balloons, bladders, cushion cells and soft actuators fail, often without warning, when stretched past what their material and seams take; past a pressure maximum a chamber can run away in size at falling pressure.'),
    h('p', {}, '<b>This is a simulation of an idealised model.</b> Its results are only as good as the netlist and the laws behind it. plenum warns when a declared limit is exceeded but never calls a design safe. No output of it replaces proof testing, guarding, relief devices, and the pressure-equipment codes, standards and licensed engineering practice that apply where you work: defer to those.'));
}

// ---- the report -----------------------------------------------------------------------------

/** The whole report as one HTML document. */
export function reportHtml(input: ReportInput): string {
  const r = input.result;
  const figures = reportFigures(input);
  // the netlist's `description:`, else the comment lines at its top
  const job = r.description ?? netlistDescription(input.source);
  const ok = r.status === 'completed';
  const failedChecks = r.expectations.filter((e) => !e.passed).length;
  const badge = !ok ? h('span', { class: 'badge bad' }, 'run failed')
    : failedChecks ? h('span', { class: 'badge bad' }, `${failedChecks} expectation${failedChecks === 1 ? '' : 's'} failed`)
      : h('span', { class: 'badge ok' }, r.expectations.length ? 'completed, expectations passed' : 'completed');
  const network = figures.find((f) => f.id === 'network');
  const charts = figures.filter((f) => f.id !== 'network');

  const events = r.events.length
    ? h('ol', { class: 'events' }, ...r.events.map((e, i) => h('li', { class: /exceeds its/.test(e.what) ? 'warn' : undefined, id: `event-${i + 1}` },
      h('span', { class: 'n' }, String(i + 1)), h('span', { class: 't' }, esc(display(e.t, 'time'))), h('span', {}, esc(e.what)))))
    : '<p>No events.</p>';
  const omitted = r.events_omitted
    ? h('p', { class: 'meta' }, esc(`${r.events_omitted} more events between the first ${r.events.length / 2} and the last ${r.events.length / 2} are not listed; all events by element: `
      + (r.event_counts ?? []).map((c) => `${c.element || 'schedules'} ${c.kind} ${c.count} (${display(c.first, 'time')} to ${display(c.last, 'time')})`).join('; ')))
    : '';
  const checks = r.expectations.length
    ? table(['expectation', 'result', 'actual', 'where'], r.expectations.map((e, i) => [
      `<b>${esc(e.name)}</b><br><span class="meta">${esc(e.message)}</span>`,
      e.passed ? '<span class="pass">pass</span>' : '<span class="fail">FAIL</span>',
      esc(actualText(e.actual, input.expectationUnits?.[i])),
      esc(`${e.file}:${e.line}:${e.column}`),
    ]), [0, 3])
    : `<p>${ok ? 'The netlist declares no expectations.' : 'Expectations are not evaluated for a run that failed.'}</p>`;
  // the run's warnings, then the netlist's own (its diagnostics of severity warning)
  const allWarnings = [...r.warnings, ...(input.netlistWarnings ?? []).map((w) => `netlist: ${w}`)];
  const warnings = allWarnings.length
    ? h('ul', { class: 'warnings' }, ...allWarnings.map((w) => h('li', {}, esc(w))))
    : '<p>No warnings.</p>';
  const st = r.stats;
  const solver = table(['method', 'steps', 'rejected', 'rhs evaluations', 'jacobians', 'LU factorisations', 'wall time'],
    [[esc(st.method), String(st.steps), String(st.rejected), String(st.rhs), String(st.jacobians), String(st.lu), `${st.wall_ms} ms`]], [0]);
  const m = r.mass;
  const mass = table(['initial', 'final', 'in through boundaries', 'relative drift'],
    [[esc(display(m.initial, 'mass')), esc(display(m.final, 'mass')), esc(display(m.through_boundaries, 'mass')), esc(m.drift.toExponential(1))]]);

  const body = [
    h('header', {},
      h('h1', {}, esc(r.title || r.file), ' ', badge),
      h('p', { class: 'meta' }, esc(`${r.file} · gas: ${input.gas} · heat: ${input.heat} · ambient ${display(r.ambient, 'pressure')} · ${display(r.end, 'time')} simulated`)),
      ...job.split(/\n\s*\n/).filter((para) => para.trim()).map((para) => h('p', { class: 'job' }, esc(para.trim()))),
      h('nav', { class: 'toc' }, ...[['glance', 'At a glance'], ['figures', 'Figures'], ['summary', 'Summary'], ['events', 'Events'], ['checks', 'Expectations'], ['warnings', 'Warnings and safety'], ['solver', 'Solver'], ['netlist', 'Netlist']]
        .map(([id, t]) => h('a', { href: `#${id}` }, esc(t))))),
    h('section', { id: 'glance' }, h('h2', {}, 'At a glance'),
      h('ul', { class: 'findings' }, ...findings(input).map((f) => h('li', {}, f))),
      network ? figureHtml(network) : ''),
    h('section', { id: 'figures' }, h('h2', {}, 'Figures'), ...charts.map(figureHtml)),
    h('section', { id: 'summary' }, h('h2', {}, 'Summary'),
      h('h3', {}, 'Chambers'), chamberTable(input),
      h('h3', {}, 'Lines and valves'), pathTable(input),
      boundaryTable(input) ? h('h3', {}, 'Boundaries') + boundaryTable(input) : '',
      // further element kinds (elements/contract.ts summaries), their fields as given, SI
      ...Object.entries(r.sections ?? {}).flatMap(([section, entries]) => {
        const rows = Object.entries(entries).map(([n, s]) => [n, flatFields(s)] as const);
        if (!rows.length) return [];
        return [h('h3', {}, esc(section[0].toUpperCase() + section.slice(1))),
          table([section.replace(/s$/, ''), ...rows[0][1].map(([k]) => `${k}`)], rows.map(([n, f]) => [esc(n), ...f.map(([, v]) => esc(v))]), [0]),
          h('p', { class: 'meta' }, 'SI units')];
      }),
      h('h3', {}, 'Mass balance'), mass),
    h('section', { id: 'events' }, h('h2', {}, 'Events'), h('p', { class: 'meta' }, 'The numbers match the marks on the top edge of the time charts.'), events, omitted),
    h('section', { id: 'checks' }, h('h2', {}, 'Expectations'), checks),
    h('section', { id: 'warnings' }, h('h2', {}, 'Warnings and safety'), warnings, safetyNotes()),
    h('section', { id: 'solver' }, h('h2', {}, 'Solver'), h('p', {}, esc(r.message)), solver),
    h('section', { id: 'netlist' }, h('h2', {}, 'Netlist'), h('p', { class: 'meta' }, esc(r.file)), h('pre', { class: 'netlist' }, h('code', {}, esc(input.source)))),
    h('footer', {}, esc(`Report written by plenum${input.version ? ` ${input.version}` : ''}. Self-contained: it loads nothing from anywhere else.`)),
  ];

  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    // nothing may be fetched: no fonts, images, scripts, styles or connections from elsewhere
    '<meta http-equiv="Content-Security-Policy" content="default-src \'none\'; style-src \'unsafe-inline\'; script-src \'unsafe-inline\'; img-src data:; base-uri \'none\'; form-action \'none\'">',
    `<title>${esc(r.title || r.file)} · plenum report</title>`,
    `<style>${CSS}</style>`,
    '</head>',
    '<body>',
    h('main', {}, ...body),
    `<script>${SCRIPT}</script>`,
    '</body>',
    '</html>',
    '',
  ].join('\n');
}
