/**
 * The report opened as a person opens it: in a real headless browser (Debian's chromium driven by
 * playwright-core), from a file, with every network request other than that file refused. The
 * figures must be there and drawn, no script may fail, the hover read-out must answer, and the
 * print layout must drop the navigation. Screenshots go to test/.artifacts/ for a person to see.
 *
 * Chromium is installed by `.ci/run` (`apt-get install -y chromium`). Without it this test fails
 * when CI is set and is skipped otherwise.
 */
import { existsSync, mkdirSync, statSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium, type Browser, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { reportInput } from '../../src/transient/report-input.js';
import { reportHtml } from '../../src/report/html.js';
import { reportFigures } from '../../src/report/plots.js';
import type { RunResult } from '../../src/transient/results.js';
import { at, modelFromFile, runChecked } from '../helpers.js';

const CHROMIUM = process.env.PLENUM_CHROMIUM ?? '/usr/bin/chromium';
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-quic'];
const ARTIFACTS = resolve('test/.artifacts');
const inCi = Boolean(process.env.CI) && !['0', 'false'].includes(String(process.env.CI).toLowerCase());
const haveChromium = existsSync(CHROMIUM);

interface Opened { page: Page; errors: string[]; refused: string[] }

/** Browser globals used inside page callbacks (the project type-checks without the DOM library). */
interface PageGlobals {
  document: { documentElement: { localName: string }; getElementsByTagName(name: string): { length: number } };
  getComputedStyle(e: unknown): { display: string };
}

describe.skipIf(!haveChromium && !inCi)('the HTML report in a headless browser', () => {
  let browser: Browser;
  const files: Record<string, string> = {};
  const results: Record<string, RunResult> = {};

  beforeAll(async () => {
    expect(haveChromium, `chromium not found at ${CHROMIUM}: CI must install it (apt-get install -y chromium), or set PLENUM_CHROMIUM`).toBe(true);
    mkdirSync(join(ARTIFACTS, 'plots'), { recursive: true });
    for (const name of ['cushion-runaway', 'manifold-mixed']) {
      const model = modelFromFile(`networks/${name}.yaml`);
      results[name] = runChecked(model);
      const input = reportInput(model, results[name], { version: 'test' });
      files[name] = join(ARTIFACTS, `report-${name}.html`);
      writeFileSync(files[name], reportHtml(input));
      if (name === 'cushion-runaway') {
        for (const f of reportFigures(input, { standalone: true })) writeFileSync(join(ARTIFACTS, 'plots', `${f.id}.svg`), f.svg);
      }
    }
    browser = await chromium.launch({ executablePath: CHROMIUM, args: ARGS });
  }, 120_000);

  afterAll(async () => { await browser?.close(); });

  /** Opens a local file; any other request is refused and recorded. */
  async function open(file: string, viewport = { width: 1200, height: 900 }, alsoAllowed: string[] = []): Promise<Opened> {
    const page = await browser.newPage({ viewport });
    const url = pathToFileURL(file).href;
    const allowed = new Set([url, ...alsoAllowed.map((f) => pathToFileURL(f).href)]);
    const errors: string[] = [];
    const refused: string[] = [];
    page.on('pageerror', (e) => errors.push(String(e)));
    page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
    await page.route('**/*', (route) => {
      const u = route.request().url();
      if (allowed.has(u)) return route.continue();
      refused.push(u);
      return route.abort();
    });
    await page.goto(url, { waitUntil: 'load' });
    return { page, errors, refused };
  }

  it('shows every figure, drawn, with no page errors and no requests beyond the file', async () => {
    const { page, errors, refused } = await open(files['cushion-runaway']);
    const figs = await page.$$eval('figure', (fs) => fs.map((f) => {
      const svg = f.querySelector('svg')!;
      const box = svg.getBoundingClientRect();
      return { id: f.id, declared: Number(f.getAttribute('data-series')), drawn: svg.querySelectorAll('path.series').length, w: box.width, h: box.height };
    }));
    expect(figs.map((f) => f.id)).toEqual(['fig-network', 'fig-pressure-stretch', 'fig-pressure', 'fig-stretch', 'fig-flow']);
    for (const f of figs) {
      expect(f.drawn, f.id).toBe(f.declared);
      expect(f.w, f.id).toBeGreaterThan(400);
      expect(f.h, f.id).toBeGreaterThan(150);
    }
    // the series are really painted: non-empty geometry
    const lengths = await page.$$eval('path.series', (ps) => ps.map((p) => (p as unknown as { getTotalLength(): number }).getTotalLength()));
    expect(lengths.length).toBe(7);
    for (const l of lengths) expect(l).toBeGreaterThan(20);
    const names = await page.$$eval('#fig-network text.node-name', (ts) => ts.map((t) => t.textContent));
    expect(names).toEqual(['cell_a', 'cell_b']);
    await page.screenshot({ path: join(ARTIFACTS, 'report-cushion-runaway.png'), fullPage: true });
    await page.screenshot({ path: join(ARTIFACTS, 'report-cushion-runaway-top.png') });
    expect(statSync(join(ARTIFACTS, 'report-cushion-runaway.png')).size).toBeGreaterThan(50_000);
    expect(errors).toEqual([]);
    expect(refused).toEqual([]);
    await page.close();
  }, 120_000);

  it('reads values out under the pointer on a time chart', async () => {
    const { page, errors } = await open(files['cushion-runaway']);
    await page.$eval('#fig-pressure', (f) => f.scrollIntoView({ block: 'center' }));
    const target = await page.$eval('#fig-pressure svg', (svg) => {
      const [l, t, w, h] = (svg.getAttribute('data-plot') ?? '').split(' ').map(Number);
      const vb = (svg as unknown as { viewBox: { baseVal: { width: number } } }).viewBox.baseVal;
      const r = svg.getBoundingClientRect();
      const k = r.width / vb.width;
      return { x: r.left + (l + w / 2) * k, y: r.top + (t + h / 2) * k };
    });
    await page.mouse.move(target.x, target.y);
    const readout = await page.$eval('.readout', (d) => ({ shown: (globalThis as unknown as PageGlobals).getComputedStyle(d).display !== 'none', text: d.textContent ?? '' }));
    expect(readout.shown).toBe(true);
    // the read-out inverts the drawn path through the axis ranges: it must give the trace's value
    const t = Number(/time \[s\]: ([\d.]+)/.exec(readout.text)?.[1]);
    expect(Math.abs(t - 4)).toBeLessThan(0.02); // the middle of the 8 s run
    for (const c of ['cell_a', 'cell_b']) {
      const shown = Number(new RegExp(`${c}: ([\\d.]+) kPa`).exec(readout.text)?.[1]);
      expect(Math.abs(shown - at(results['cushion-runaway'], `${c}.gauge`, t) / 1000), c).toBeLessThan(0.05);
    }
    expect(errors).toEqual([]);
    await page.close();
  }, 120_000);

  it('prints without the navigation and keeps the figures', async () => {
    const { page } = await open(files['manifold-mixed']);
    await page.emulateMedia({ media: 'print' });
    expect(await page.$eval('nav.toc', (n) => (globalThis as unknown as PageGlobals).getComputedStyle(n).display)).toBe('none');
    const widths = await page.$$eval('figure svg', (ss) => ss.map((s) => s.getBoundingClientRect().width));
    expect(widths.length).toBe(7);
    for (const w of widths) expect(w).toBeGreaterThan(300);
    await page.pdf({ path: join(ARTIFACTS, 'report-manifold-mixed.pdf'), format: 'A4', printBackground: true });
    expect(statSync(join(ARTIFACTS, 'report-manifold-mixed.pdf')).size).toBeGreaterThan(20_000);
    await page.emulateMedia({ media: 'screen' });
    await page.screenshot({ path: join(ARTIFACTS, 'report-manifold-mixed.png'), fullPage: true });
    await page.close();
  }, 120_000);

  it('would notice an external request (control: a page that asks for one)', async () => {
    const probe = join(ARTIFACTS, 'control-external.html');
    writeFileSync(probe, '<!DOCTYPE html><html><body><img src="http://example.invalid/x.png" alt=""></body></html>');
    const { page, refused } = await open(probe);
    expect(refused).toEqual(['http://example.invalid/x.png']);
    await page.close();
  }, 120_000);

  it('opens each standalone SVG as a valid image', async () => {
    const ids = ['network', 'pressure-stretch', 'pressure', 'stretch', 'flow'];
    const svgFiles = ids.map((id) => join(ARTIFACTS, 'plots', `${id}.svg`));
    const { page, errors, refused } = await open(svgFiles[0], { width: 1000, height: 700 }, svgFiles);
    for (const [i, id] of ids.entries()) {
      if (i > 0) await page.goto(pathToFileURL(svgFiles[i]).href, { waitUntil: 'load' });
      const root = await page.evaluate(() => {
        const { document } = globalThis as unknown as PageGlobals;
        return { name: document.documentElement.localName, errors: document.getElementsByTagName('parsererror').length };
      });
      expect(root, id).toEqual({ name: 'svg', errors: 0 });
      if (id === 'pressure-stretch') await page.screenshot({ path: join(ARTIFACTS, 'plot-pressure-stretch.png') });
    }
    expect(errors).toEqual([]);
    expect(refused).toEqual([]);
    await page.close();
  }, 120_000);
});
