/**
 * The report in a real browser: Debian's headless Chromium driven by playwright-core (which
 * never downloads a browser; `.ci/run` installs chromium when it is missing). Two real runs of
 * the command-line tool write their reports (fit writes report.html by default): the demo town
 * with a short forecast, and a file whose region name holds a script tag and quotes. Each page
 * is opened from file://; it must log no console message of error or warning level, raise no
 * page error, request nothing but its own file, show every chart with a non-zero size, and
 * show the hostile name as text while running nothing. Screenshots go to test-output/ for a
 * person to look at.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium, type Browser, type Page } from 'playwright-core';
import { runCli, ROOT } from '../cli/helpers.js';

const CHROMIUM = '/usr/bin/chromium';
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];
const SHOTS = join(ROOT, 'test-output');
const SHORT = ['--chains', '2', '--warmup', '500', '--draws', '100', '--thin', '1', '--threads', '1', '--seed', '3', '--quiet'];
const HOSTILE = `<script>window.__pwned = 1</script>"Marsh" & 'Fen' <img src=x onerror="window.__pwned = 2">`;

let work: string;
let browser: Browser;
let demoReport: string;
let hostileReport: string;

/** A CSV field quoted as RFC 4180 asks (quotes doubled). */
const quoted = (s: string) => `"${s.replace(/"/g, '""')}"`;

beforeAll(async () => {
  if (!existsSync(CHROMIUM)) {
    throw new Error(`${CHROMIUM} not found: install Debian's chromium (apt-get install -y chromium); .ci/run does this`);
  }
  work = mkdtempSync(join(tmpdir(), 'waxwane-browser-'));
  // the demo town, with a two-scenario forecast so that every section has something to draw
  const demo = join(work, 'demo');
  const fitDemo = runCli(['fit', join(ROOT, 'data-demo', 'larkmere', 'cases.csv'), '--population', '320000', '--out', demo, ...SHORT, '--horizon', '14', '--scale', '0.6']);
  // the same counts under a hostile region name
  const lines = readFileSync(join(ROOT, 'data-demo', 'larkmere', 'cases.csv'), 'utf8').trim().split('\n');
  const cases = join(work, 'hostile.csv');
  writeFileSync(cases, ['region,' + lines[0], ...lines.slice(1, 91).map((l) => `${quoted(HOSTILE)},${l}`)].join('\n') + '\n');
  const hostile = join(work, 'hostile');
  const fitHostile = runCli(['fit', cases, '--region', HOSTILE, '--population', '320000', '--out', hostile, ...SHORT]);
  const [a, b] = await Promise.all([fitDemo, fitHostile]);
  expect(a.code, a.stderr).toBe(0);
  expect(b.code, b.stderr).toBe(0);
  demoReport = join(demo, 'report.html');
  hostileReport = join(hostile, 'report.html');
  browser = await chromium.launch({ executablePath: CHROMIUM, args: ARGS });
});

afterAll(async () => {
  await browser?.close();
  if (work !== undefined) rmSync(work, { recursive: true, force: true });
});

interface Visit {
  page: Page;
  /** console messages of level error or warning, and page errors */
  problems: string[];
  /** every URL the page asked for */
  requests: string[];
}

async function open(file: string): Promise<Visit> {
  const page = await browser.newPage({ viewport: { width: 1100, height: 1400 } });
  const problems: string[] = [];
  const requests: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error' || m.type() === 'warning') problems.push(`${m.type()}: ${m.text()}`);
  });
  page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
  page.on('request', (r) => requests.push(r.url()));
  await page.goto(pathToFileURL(file).href, { waitUntil: 'load' });
  return { page, problems, requests };
}

describe('the report in Chromium', () => {
  it('the demo report: no console errors, no requests but itself, every chart drawn with a size', async () => {
    const { page, problems, requests } = await open(demoReport);
    try {
      expect(problems).toEqual([]);
      expect(requests).toEqual([pathToFileURL(demoReport).href]);
      const sections = await page.locator('main > section').count();
      expect(sections).toBe(10);
      const charts = await page.locator('figure.chart svg').evaluateAll((svgs) =>
        svgs.map((s) => {
          const r = s.getBoundingClientRect();
          return { width: r.width, height: r.height, marks: s.querySelectorAll('path, line, rect').length };
        }),
      );
      // counts, R_t, R_0, beta, infections, 3 nowcast, growth, 3 forecast rows, parameters, 4 x (trace + rank)
      expect(charts.length).toBe(21);
      for (const c of charts) {
        expect(c.width).toBeGreaterThan(100);
        expect(c.height).toBeGreaterThan(50);
        expect(c.marks).toBeGreaterThan(3);
      }
      expect(await page.locator('script').count()).toBe(0);
      const status = await page.locator('header .status').innerText();
      expect(status).toMatch(/^. (NOT converged|Converged)\./);
      mkdirSync(SHOTS, { recursive: true });
      await page.screenshot({ path: join(SHOTS, 'report-demo-top.png') });
      await page.screenshot({ path: join(SHOTS, 'report-demo.png'), fullPage: true });
      // the print style sheet hides the contents and keeps every chart
      await page.emulateMedia({ media: 'print' });
      expect(await page.locator('nav.contents').isVisible()).toBe(false);
      expect(await page.locator('figure.chart svg').count()).toBe(21);
    } finally {
      await page.close();
    }
  });

  it('a region named with a script tag and quotes shows as text and runs nothing', async () => {
    const { page, problems, requests } = await open(hostileReport);
    try {
      expect(problems).toEqual([]);
      expect(requests).toEqual([pathToFileURL(hostileReport).href]);
      expect(await page.locator('h1').innerText()).toBe(HOSTILE);
      expect(await page.title()).toBe(`${HOSTILE}: transmission report (waxwane)`);
      expect(await page.locator('script').count()).toBe(0);
      expect(await page.locator('img').count()).toBe(0);
      expect(await page.evaluate(() => (globalThis as unknown as { __pwned?: number }).__pwned)).toBeUndefined();
      expect(await page.locator('dl.pairs dd', { hasText: '<script>' }).first().innerText()).toBe(HOSTILE);
      mkdirSync(SHOTS, { recursive: true });
      await page.screenshot({ path: join(SHOTS, 'report-hostile-top.png') });
    } finally {
      await page.close();
    }
  });
});
