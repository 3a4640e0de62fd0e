/**
 * The HTML report, without a browser: the page built from a run folder written by the real
 * output writers (report-fixture.ts) has every section, valid inline charts and nothing that
 * loads or runs; user text is escaped in the HTML and in the SVG; files that are missing give
 * notes, not failures; the numbers it shows come from the right places. The browser tests
 * (test/browser/report.test.ts) open real reports in Chromium.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { createRequire } from 'node:module';
import { mkdtempSync, rmSync, writeFileSync, readFileSync, unlinkSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeFixtureRun } from './report-fixture.js';
import { escapeHtml } from '../../src/outputs/report/escape.js';
import { html, Html, intervalName, num } from '../../src/outputs/report/html.js';
import { readRunFolder, buildFitReport, writeRunReport } from '../../src/outputs/report/index.js';
import { averageRanks, rankHistogram } from '../../src/outputs/report/charts/mixing.js';
import { doublingTime } from '../../src/outputs/report/sections/growth.js';
import { bandLevels } from '../../src/outputs/report/series.js';
import { priorEntries } from '../../src/outputs/report/sections/parameters.js';
import { worstMixing } from '../../src/outputs/report/sections/diagnostics.js';
import { renderSvg } from '../../src/outputs/report/render.js';
import { fanChartSpec } from '../../src/outputs/report/charts/fan.js';
import { resolvePriorSet } from '../../src/io/priors.js';
import { WaxwaneError } from '../../src/errors.js';

const require = createRequire(import.meta.url);
const lognormalQuantile = require('@stdlib/stats/base/dists/lognormal/quantile') as (p: number, mu: number, sigma: number) => number;
const betaQuantile = require('@stdlib/stats/base/dists/beta/quantile') as (p: number, a: number, b: number) => number;
const normalQuantile = require('@stdlib/stats/base/dists/normal/quantile') as (p: number, mu: number, sigma: number) => number;

const HOSTILE = `<script>alert("x")</script><img src=x onerror='alert(1)'> & "quoted" 'single'`;
const HOSTILE_ESCAPED = '&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt;&lt;img src=x onerror=&#39;alert(1)&#39;&gt; &amp; &quot;quoted&quot; &#39;single&#39;';

let work: string;
beforeAll(() => {
  work = mkdtempSync(join(tmpdir(), 'waxwane-report-'));
});
afterAll(() => {
  rmSync(work, { recursive: true, force: true });
});

/** Tags a page may hold: no script, no embedded content, nothing that loads. */
function forbiddenMarkup(page: string): string[] {
  const found: string[] = [];
  for (const re of [/<script/i, /<iframe/i, /<img/i, /<link/i, /<object/i, /<embed/i, /<image/i, /<use\b/i, /<foreignObject/i, /@import/i, /url\((?!#)/i, /javascript:/i]) {
    if (re.test(page)) found.push(re.source);
  }
  // an event handler attribute: look at tags with their (double-quoted, so escaped) values emptied
  if (/<[a-z][^>]*\son[a-z]+\s*=/i.test(page.replace(/="[^"]*"/g, '=""'))) found.push('event handler attribute');
  // the only addresses allowed are in-page fragments and XML namespaces
  for (const m of page.matchAll(/(?:src|href|xlink:href)\s*=\s*"([^"]*)"/gi)) if (!m[1].startsWith('#')) found.push(m[0]);
  for (const m of page.matchAll(/https?:\/\/[^\s"'<>)]*/g)) if (!/^http:\/\/www\.w3\.org\/(2000\/svg|1999\/xlink)$/.test(m[0])) found.push(m[0]);
  return found;
}

describe('escapeHtml', () => {
  it('escapes the five characters of HTML text and attributes (WHATWG HTML serialisation) and drops control characters', () => {
    expect(escapeHtml('<b>"x" & y</b>')).toBe('&lt;b&gt;&quot;x&quot; &amp; y&lt;/b&gt;');
    expect(escapeHtml(HOSTILE)).toBe(HOSTILE_ESCAPED);
    expect(escapeHtml('a\u0000b\u0007c\td\ne')).toBe('abc\td\ne');
  });

  it('html`` escapes interpolated strings and numbers but keeps Html as it is', () => {
    const inner = html`<em>${'<i>'}</em>`;
    expect(html`<p title="${'"q"'}">${inner}${3}${null}${['<', Html.trusted('<br>')]}</p>`.text).toBe('<p title="&quot;q&quot;"><em>&lt;i&gt;</em>3&lt;<br></p>');
  });
});

describe('number and interval names', () => {
  it('num shortens and groups', () => {
    expect(num(0.123456)).toBe('0.123');
    expect(num(123456.7)).toBe('123,457');
    expect(num(NaN)).toBe('n/a');
  });
  it('intervalName names central intervals by their mass', () => {
    expect(intervalName(0.05, 0.95)).toBe('90%');
    expect(intervalName(0.025, 0.975)).toBe('95%');
    expect(intervalName(0.1, 0.8)).toBe('10%–80%');
  });
  it('bandLevels picks the outer, inner and median columns', () => {
    expect(bandLevels([0.05, 0.25, 0.5, 0.75, 0.95])).toMatchObject({ outer: [0, 4], inner: [1, 3], mid: 2, outerName: '90%', innerName: '50%' });
    expect(bandLevels([0.025, 0.5, 0.975])).toMatchObject({ outer: [0, 2], inner: null, mid: 1, outerName: '95%', innerName: null });
    expect(bandLevels([0.1, 0.9])).toMatchObject({ mid: -1, midName: 'mean' });
  });
});

describe('doublingTime', () => {
  it('is ln 2 / r and maps the interval of r end for end (common practice: T = ln 2 / r)', () => {
    const d = doublingTime(Math.LN2 / 10, Math.LN2 / 20, Math.LN2 / 5);
    expect(d.kind).toBe('doubling');
    expect(d.mid).toBeCloseTo(10, 12);
    expect(d.lo).toBeCloseTo(5, 12);
    expect(d.hi).toBeCloseTo(20, 12);
    const h = doublingTime(-Math.LN2 / 8, -Math.LN2 / 4, -Math.LN2 / 16);
    expect(h).toMatchObject({ kind: 'halving' });
    expect([h.mid, h.lo, h.hi].map((x) => Number(x.toFixed(9)))).toEqual([8, 4, 16]);
    expect(doublingTime(0.01, -0.01, 0.03).kind).toBe('unclear');
  });
});

describe('rank plots', () => {
  it('averageRanks gives tied values their mean rank (as R rank(ties.method = "average"); common practice)', () => {
    expect(Array.from(averageRanks([3, 1, 1, 2]))).toEqual([4, 1.5, 1.5, 3]);
  });
  it('rankHistogram: two chains that never overlap fill opposite halves', () => {
    const h = rankHistogram([1, 2, 3, 4, 5, 6, 7, 8], [1, 1, 1, 1, 2, 2, 2, 2], 2);
    expect(h.bins).toEqual([
      { chain: 1, bin: 0, count: 4 },
      { chain: 1, bin: 1, count: 0 },
      { chain: 2, bin: 0, count: 0 },
      { chain: 2, bin: 1, count: 4 },
    ]);
    expect(h.expected).toBe(2);
  });
  it('rankHistogram: interleaved chains are flat, and counts add up to the draws', () => {
    const values = Array.from({ length: 400 }, (_, i) => i);
    const chain = values.map((i) => 1 + (i % 4));
    const h = rankHistogram(values, chain, 10);
    expect(h.bins.every((b) => b.count === 10)).toBe(true);
    expect(h.bins.reduce((a, b) => a + b.count, 0)).toBe(400);
  });
});

describe('priorEntries', () => {
  it('prior quantiles match the @stdlib distributions (reference library)', () => {
    const set = resolvePriorSet('default');
    const entries = priorEntries(set, ['start_reproduction', 'ascertainment', 'walk_step[3]', 'weekday_mon', 'dispersion']);
    const at = (p: string) => entries.find((e) => e.parameter === p)!;
    // default set: start_reproduction lognormal(median 1.5, sdlog 0.5); ascertainment beta(2, 6)
    expect(at('start_reproduction').quantile(0.05)).toBeCloseTo(lognormalQuantile(0.05, Math.log(1.5), 0.5), 12);
    expect(at('ascertainment').quantile(0.95)).toBeCloseTo(betaQuantile(0.95, 2, 6), 12);
    expect(at('walk_step[3]').quantile(0.95)).toBeCloseTo(normalQuantile(0.95, 0, 1), 12);
    expect(at('weekday_mon').quantile(0.05)).toBeCloseTo(normalQuantile(0.05, 0, set.priors.weekday_sd), 12);
    // 1/sqrt(phi) ~ half-normal(1): phi's 5% quantile is (Phi^-1(0.975))^-2 (change of variables)
    expect(at('dispersion').quantile(0.05)).toBeCloseTo(normalQuantile(0.975, 0, 1) ** -2, 10);
    expect(at('start_reproduction').description).toBe('lognormal(median 1.5, sdlog 0.5)');
  });
});

describe('worstMixing', () => {
  it('orders by R-hat, NaN first, then by the lower ESS', () => {
    const d = (parameter: string, rhat: number, ess: number) => ({ parameter, rhat, ess_bulk: ess, ess_tail: ess, mcse_mean: 0 });
    expect(worstMixing([d('a', 1.0, 500), d('b', 1.2, 500), d('c', NaN, 500), d('e', 1.0, 100)]).map((x) => x.parameter)).toEqual(['c', 'b', 'e', 'a']);
  });
});

describe('renderSvg', () => {
  it('draws a fan chart to SVG with no warning, escaping text', async () => {
    const warnings: string[] = [];
    const points = Array.from({ length: 10 }, (_, t) => ({ date: `2031-01-${String(t + 1).padStart(2, '0')}`, mid: 1 + t / 10, outerLo: 0.8, outerHi: 2.2, innerLo: 0.9, innerHi: 2 }));
    const svg = await renderSvg(fanChartSpec({ series: [{ points, colour: '#0072B2' }], reference: { value: 1 }, yTitle: HOSTILE, description: 'x' }), (w) => warnings.push(w));
    expect(warnings).toEqual([]);
    expect(svg.startsWith('<svg')).toBe(true);
    expect(svg).not.toMatch(/<script|<img/);
    expect(svg).toContain('&lt;script&gt;alert("x")');
  });
});

describe('the report page of a run folder', () => {
  it('has every section, one inline SVG per chart, unique ids and nothing that loads or runs', async () => {
    const dir = writeFixtureRun(join(work, 'plain'));
    const report = await buildFitReport(readRunFolder(dir));
    expect(report.chartWarnings).toEqual([]);
    const page = report.html;
    for (const id of ['counts', 'reproduction', 'transmission', 'infections', 'growth', 'forecast', 'parameters', 'diagnostics', 'details', 'cautions']) {
      expect(page).toContain(`<section id="${id}"`);
    }
    expect(forbiddenMarkup(page)).toEqual([]);
    // counts, R_t, R_0, beta, infections, growth, parameters, 4 x (trace + rank)
    expect((page.match(/<svg /g) ?? []).length).toBe(7 + 8);
    const ids = [...page.matchAll(/\sid="([^"]+)"/g)].map((m) => m[1]);
    expect(new Set(ids).size).toBe(ids.length);
    expect(page).toContain('Content-Security-Policy');
    // no forecast files: the section says so
    expect(page).toContain('No forecast.csv in this run folder');
    expect(page).toContain('No nowcast.csv in this run folder');
  });

  it('shows the numbers of the run: verdict, last-day R_t from summary.csv, prior set, seed, hash', async () => {
    const dir = writeFixtureRun(join(work, 'numbers'));
    const folder = readRunFolder(dir);
    const page = (await buildFitReport(folder)).html;
    const last = folder.summary.rows.filter((r) => r.quantity === 'effective_reproduction').at(-1)!;
    expect(page).toContain(`${num(last.q[2])} [${num(last.q[0])}, ${num(last.q[4])}]`);
    expect(page).toContain(folder.run.converged ? 'Converged.' : 'NOT converged.');
    expect(page).toContain('ab'.repeat(32));
    expect(page).toContain('lognormal(median 1.5, sdlog 0.5)');
  });

  it('says NOT converged plainly for chains that disagree', async () => {
    const dir = writeFixtureRun(join(work, 'shifted'), { shifted: true });
    const folder = readRunFolder(dir);
    expect(folder.run.converged).toBe(false);
    const page = (await buildFitReport(folder)).html;
    expect(page).toContain('NOT converged.');
    expect(page).toContain('The chains did NOT converge');
    expect(page).toMatch(/<tr class="fail">/);
  });

  it('escapes user text everywhere: region, file name, prior description, warnings, scenario names (in the SVG too)', async () => {
    const dir = writeFixtureRun(join(work, 'hostile'), {
      region: HOSTILE,
      file: `${HOSTILE}.csv`,
      priorDescription: `</style><style>body{display:none}</style>${HOSTILE}`,
      warnings: [`look ${HOSTILE}`],
      scenarios: ['carry_on', HOSTILE],
    });
    const report = await buildFitReport(readRunFolder(dir));
    expect(report.chartWarnings).toEqual([]);
    const page = report.html;
    expect(forbiddenMarkup(page)).toEqual([]);
    expect(page).toContain(`<h1>${HOSTILE_ESCAPED}</h1>`);
    expect(page).toContain(`<title>${HOSTILE_ESCAPED}: transmission report (waxwane)</title>`);
    expect(page).toContain(`&lt;/style&gt;&lt;style&gt;body{display:none}&lt;/style&gt;`);
    expect((page.match(/<style>/g) ?? []).length).toBe(1);
    // the scenario name reaches the facet headers of the SVG, escaped by the chart library
    const svgText = [...page.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]);
    expect(svgText.some((t) => t.startsWith('&lt;script&gt;alert("x")'))).toBe(true);
  });

  it('draws forecast scenarios side by side and the scenario table when the files exist', async () => {
    const dir = writeFixtureRun(join(work, 'forecast'), { scenarios: ['carry_on', 'hold', 'halved'] });
    const report = await buildFitReport(readRunFolder(dir));
    expect(report.chartWarnings).toEqual([]);
    const page = report.html;
    expect(page).not.toContain('No forecast.csv in this run folder');
    // three quantities drawn as panels, onsets listed
    expect((page.match(/<svg /g) ?? []).length).toBe(15 + 3);
    expect(page).toContain('Also in forecast.csv: <code>onsets</code>');
    expect(page).toContain('Median and 90% interval per scenario (scenarios.csv)');
    for (const s of ['carry_on', 'hold', 'halved']) expect(page).toContain(`<th scope="col" class="num">${s}</th>`);
  });

  it('works without data.csv and draws.csv, saying what is missing', async () => {
    const dir = writeFixtureRun(join(work, 'sparse'), { data: false });
    unlinkSync(join(dir, 'draws.csv'));
    const report = await buildFitReport(readRunFolder(dir));
    expect(report.chartWarnings).toEqual([]);
    expect(report.html).toContain('data.csv is not in the run folder');
    expect(report.html).toContain('draws.csv is not in the run folder');
  });

  it('uses the quantile levels of the run (95% intervals for 0.025, 0.5, 0.975)', async () => {
    const dir = writeFixtureRun(join(work, 'levels'), { levels: [0.025, 0.5, 0.975] });
    const report = await buildFitReport(readRunFolder(dir));
    expect(report.chartWarnings).toEqual([]);
    expect(report.html).toContain('95% interval');
    expect(report.html).not.toContain('90% interval');
  });
});

describe('readRunFolder refuses what is not a run folder', () => {
  it('a missing folder, a folder without run.json, and a broken number name the file, line and column', () => {
    expect(() => readRunFolder(join(work, 'nope'))).toThrow(/no such folder/);
    const empty = join(work, 'empty');
    writeFixtureRun(empty);
    unlinkSync(join(empty, 'run.json'));
    expect(() => readRunFolder(empty)).toThrow(/no run\.json in this folder/);
    const broken = writeFixtureRun(join(work, 'broken'));
    const lines = readFileSync(join(broken, 'diagnostics.csv'), 'utf8').split('\n');
    lines[3] = lines[3].replace(/,[^,]*$/, ',oops');
    writeFileSync(join(broken, 'diagnostics.csv'), lines.join('\n'));
    let err: unknown;
    try {
      readRunFolder(broken);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(WaxwaneError);
    expect((err as Error).message).toMatch(/diagnostics\.csv, line 4, column "mcse_mean": "oops" is not a number/);
    const notOurs = writeFixtureRun(join(work, 'not-ours'));
    writeFileSync(join(notOurs, 'run.json'), JSON.stringify({ tool: 'other' }));
    expect(() => readRunFolder(notOurs)).toThrow(/not a run record written by waxwane/);
  });

  it('writeRunReport writes report.html into the folder', async () => {
    const dir = writeFixtureRun(join(work, 'write'));
    const path = await writeRunReport(dir);
    expect(path).toBe(join(dir, 'report.html'));
    expect(readFileSync(path, 'utf8').startsWith('<!DOCTYPE html>')).toBe(true);
  });
});
