/**
 * Chart specification to SVG text, headless: vega-lite compiles the declarative specification
 * to a vega specification, and vega renders its scene graph to an SVG string in Node (renderer
 * 'none': no canvas, no DOM, nothing loaded from outside). The chart library escapes every
 * piece of text it writes into the SVG (labels, titles, descriptions), so data never become
 * markup.
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { LoggerInterface } from 'vega';
import type { TopLevelSpec } from 'vega-lite';
import { VEGA_BUNDLE } from '../../util/vendor-bundles.js';

/** The chart library's entry points this module uses. */
interface ChartLibrary {
  parse: typeof import('vega').parse;
  View: typeof import('vega').View;
  compile: typeof import('vega-lite').compile;
}

/**
 * vega and vega-lite: from the one-file bundle the build writes (scripts/bundle-vendor.mjs,
 * dist/vendor/vega-bundle.mjs: the same code, loaded in well under half the time of the
 * packages' hundreds of modules), else from the packages (running from src/ in the tests).
 */
async function loadChartLibrary(): Promise<{ library: ChartLibrary; bundled: boolean }> {
  const bundle = new URL(`../../vendor/${VEGA_BUNDLE}`, import.meta.url);
  if (existsSync(fileURLToPath(bundle))) return { library: (await import(bundle.href)) as ChartLibrary, bundled: true };
  const [vega, vegaLite] = await Promise.all([import('vega'), import('vega-lite')]);
  return { library: { parse: vega.parse, View: vega.View, compile: vegaLite.compile }, bundled: false };
}

// loaded with this module, so that importing it (cli/fit.ts preloads the report's code while
// the chains run) loads the chart library too
const chartLibrary = await loadChartLibrary();
const { parse, View, compile } = chartLibrary.library;

/** Whether the chart library came from the bundle (else from the packages). */
export const VEGA_BUNDLED = chartLibrary.bundled;

export type ChartSpec = TopLevelSpec;

/** A logger for vega and vega-lite that hands warnings and errors to `sink` and drops the rest. */
function collectingLogger(sink: (message: string) => void): LoggerInterface {
  let level = 2;
  const logger: LoggerInterface = {
    level(l?: number) {
      if (l === undefined) return level;
      level = l;
      return logger;
    },
    error(...args: unknown[]) {
      sink(args.map(String).join(' '));
      return logger;
    },
    warn(...args: unknown[]) {
      sink(args.map(String).join(' '));
      return logger;
    },
    info() {
      return logger;
    },
    debug() {
      return logger;
    },
  };
  return logger;
}

/**
 * Renders a vega-lite specification to an SVG document string. Warnings of the chart library
 * (a field it cannot find, a scale it had to change) go to `onWarning`; the tests treat any as
 * a failure.
 *
 * @remarks vega numbers its clip paths with one counter per process, so the SVGs of one report
 * never share an element id when inlined in one HTML page (a test checks this).
 */
export async function renderSvg(spec: ChartSpec, onWarning: (message: string) => void = () => {}): Promise<string> {
  const logger = collectingLogger(onWarning);
  const compiled = compile(spec, { logger }).spec;
  const view = new View(parse(compiled), { renderer: 'none', logger });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}
