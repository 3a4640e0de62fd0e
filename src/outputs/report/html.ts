/**
 * Building HTML safely: the `html` template tag escapes every interpolated string, so text
 * from the run folder cannot become markup by mistake; only values already of type
 * {@link Html} (made by the tag itself, or an SVG produced by the chart library) pass as they
 * are. Plus the few building blocks every section uses: tables, figures with keys, notes.
 */
import { escapeHtml } from './escape.js';
import { formatNumber } from '../format.js';

/** A piece of markup that is safe to insert as it is. */
export class Html {
  private constructor(readonly text: string) {}

  /** Markup the report made itself (templates, SVG from the chart library). */
  static trusted(text: string): Html {
    return new Html(text);
  }

  toString(): string {
    return this.text;
  }
}

export type HtmlValue = Html | string | number | null | undefined | false | readonly HtmlValue[];

function piece(v: HtmlValue): string {
  if (v === null || v === undefined || v === false) return '';
  if (v instanceof Html) return v.text;
  if (Array.isArray(v)) return (v as readonly HtmlValue[]).map(piece).join('');
  return escapeHtml(String(v));
}

/** Template tag: literal parts are markup, interpolated values are escaped unless they are Html. */
export function html(strings: TemplateStringsArray, ...values: HtmlValue[]): Html {
  let out = strings[0];
  for (let i = 0; i < values.length; i++) out += piece(values[i]) + strings[i + 1];
  return Html.trusted(out);
}

/** Joins pieces of markup. */
export function join(parts: readonly HtmlValue[], separator = ''): Html {
  return Html.trusted(parts.map(piece).join(separator));
}

/**
 * A number for reading: three significant digits by default, thousands grouped from 10,000
 * up, `n/a` for NaN and infinities.
 */
export function num(x: number, digits = 3): string {
  if (!Number.isFinite(x)) return 'n/a';
  if (Math.abs(x) >= 10_000) return Math.round(x).toLocaleString('en-US');
  return formatNumber(x, digits);
}

/** Median and interval, e.g. `0.94 [0.81, 1.1]`. */
export function interval(mid: number, lo: number, hi: number, digits = 3): string {
  return `${num(mid, digits)} [${num(lo, digits)}, ${num(hi, digits)}]`;
}

/** The name of an interval between two quantile levels: "90%" when central, else "5%-95%". */
export function intervalName(lo: number, hi: number): string {
  const pct = (p: number) => Number((p * 100).toPrecision(6));
  return Math.abs(lo + hi - 1) < 1e-9 ? `${pct(hi - lo)}%` : `${pct(lo)}%–${pct(hi)}%`;
}

export interface Column<R> {
  head: HtmlValue;
  cell: (row: R) => HtmlValue;
  /** right-aligned numbers */
  numeric?: boolean;
}

/** A table with a caption; `rowClass` marks rows (e.g. failing ones). */
export function table<R>(caption: HtmlValue, columns: readonly Column<R>[], rows: readonly R[], rowClass?: (row: R) => string | null): Html {
  const head = columns.map((c) => html`<th scope="col"${c.numeric === true ? html` class="num"` : ''}>${c.head}</th>`);
  const body = rows.map((r) => {
    const cls = rowClass?.(r) ?? null;
    const cells = columns.map((c) => html`<td${c.numeric === true ? html` class="num"` : ''}>${c.cell(r)}</td>`);
    return html`<tr${cls === null ? '' : html` class="${cls}"`}>${cells}</tr>`;
  });
  return html`<div class="table-wrap"><table>${caption === null ? '' : html`<caption>${caption}</caption>`}<thead><tr>${head}</tr></thead><tbody>${body}</tbody></table></div>`;
}

/** One entry of a figure's key: a swatch drawn in CSS and its meaning. */
export interface KeyEntry {
  kind: 'line' | 'band' | 'dot' | 'dash' | 'shade';
  colour: string;
  label: string;
  /** band opacity */
  opacity?: number;
}

function swatch(k: KeyEntry): Html {
  // colours and opacities come from the report's own theme, never from the run folder
  const style = k.kind === 'band' || k.kind === 'shade' ? `background:${k.colour};opacity:${k.opacity ?? 1}` : k.kind === 'dot' ? `background:${k.colour}` : `border-color:${k.colour}`;
  return html`<span class="swatch swatch-${k.kind}" style="${style}" aria-hidden="true"></span>`;
}

/** A figure's key as a list of swatches and labels. */
export function keyList(entries: readonly KeyEntry[]): Html {
  return entries.length === 0 ? html`` : html`<ul class="key">${entries.map((k) => html`<li>${swatch(k)}${k.label}</li>`)}</ul>`;
}

/** A figure: the chart (an SVG from the chart library), its key and a caption. */
export function figure(svg: string, options: { key?: readonly KeyEntry[]; caption?: HtmlValue; className?: string }): Html {
  const key = keyList(options.key ?? []);
  return html`<figure class="chart${options.className === undefined ? '' : ` ${options.className}`}">${key}<div class="svg-box">${Html.trusted(svg)}</div>${
    options.caption === undefined ? '' : html`<figcaption>${options.caption}</figcaption>`
  }</figure>`;
}

/** A short note, e.g. why a section shows nothing. */
export function note(text: HtmlValue): Html {
  return html`<p class="note">${text}</p>`;
}
