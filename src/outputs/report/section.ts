/**
 * What a section of a report is, and what every section function receives. A page is a list
 * of sections; each section is one function `(ctx) => Promise<Section>`, so a page of another
 * kind (the comparison of prior sets, for instance) is a new list of section functions over
 * its own context, assembled by the same page shell (page.ts) and drawn with the same chart
 * specifications (charts/).
 */
import type { Html } from './html.js';
import { renderSvg, type ChartSpec } from './render.js';
import type { RunFolder } from './run-folder.js';

export interface Section {
  /** fragment id, unique in the page */
  id: string;
  title: string;
  body: Html;
}

export interface ReportContext {
  folder: RunFolder;
  /** renders a chart specification to SVG, collecting the chart library's warnings */
  chart(spec: ChartSpec): Promise<string>;
}

export type SectionFunction = (ctx: ReportContext) => Promise<Section>;

/** A context whose chart warnings go to `warnings`. */
export function createContext(folder: RunFolder, warnings: string[]): ReportContext {
  return { folder, chart: (spec) => renderSvg(spec, (w) => warnings.push(w)) };
}
