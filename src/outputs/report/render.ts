/**
 * Chart specification to SVG text, headless: vega-lite compiles the declarative specification
 * to a vega specification, and vega renders its scene graph to an SVG string in Node (renderer
 * 'none': no canvas, no DOM, nothing loaded from outside). The chart library escapes every
 * piece of text it writes into the SVG (labels, titles, descriptions), so data never become
 * markup.
 */
import { parse, View, type LoggerInterface } from 'vega';
import { compile, type TopLevelSpec } from 'vega-lite';

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
