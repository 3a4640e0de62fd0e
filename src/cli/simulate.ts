import { inputError } from '../errors.js';
import { readSimScenario } from '../io/sim-scenario.js';
import { MAX_DAY, isoFromDay, parseIsoDate } from '../io/dates.js';
import { simulatePlace } from '../model/simulate.js';
import { createRng, deriveSeed } from '../util/rng.js';
import { prepareOutputDir, OutputSet } from '../io/atomic.js';
import { formatNumber, toCsv } from '../outputs/format.js';
import type { Reporter } from './reporter.js';

export interface SimulateOptions {
  out: string;
  seed: number;
  force: boolean;
}

/** `waxwane simulate SCENARIO --out DIR`: writes cases.csv and truth.csv. */
export function runSimulate(scenarioFile: string, options: SimulateOptions, reporter: Reporter): void {
  const scenario = readSimScenario(scenarioFile);
  const lastDay = (parseIsoDate(scenario.start_date) as number) + scenario.days - 1;
  if (lastDay > MAX_DAY) {
    throw inputError(
      { file: scenarioFile, field: 'days' },
      `${scenario.days} days from start_date ${scenario.start_date} run past ${isoFromDay(MAX_DAY)}`,
      'choose an earlier start_date or fewer days',
    );
  }
  prepareOutputDir(options.out, { force: options.force });
  const withRegion = scenario.places.length > 1;
  const caseRows: string[][] = [];
  const truthRows: string[][] = [];
  scenario.places.forEach((place, i) => {
    let sim: ReturnType<typeof simulatePlace>;
    try {
      sim = simulatePlace(scenario, place, createRng(deriveSeed(options.seed, i)));
    } catch (e) {
      // the simulator refuses a trajectory whose compartments turn negative or non-finite
      if (!(e instanceof RangeError)) throw e;
      throw inputError(
        { file: scenarioFile, field: `places[${i}]` },
        `the epidemic of "${place.name}" cannot be simulated (${e.message}): the time step is too coarse for its periods and reproduction numbers`,
        'raise model.substeps, or lengthen latent_days and infectious_days',
      );
    }
    const tr = sim.truth;
    for (let t = 0; t < sim.dates.length; t++) {
      const region = withRegion ? [place.name] : [];
      caseRows.push([sim.dates[t], String(sim.cases[t]), ...region]);
      truthRows.push([
        sim.dates[t],
        ...region,
        formatNumber(tr.transmission_rate[t]),
        formatNumber(tr.basic_reproduction[t]),
        formatNumber(tr.effective_reproduction[t]),
        formatNumber(tr.infections[t]),
        formatNumber(tr.onsets[t]),
        formatNumber(tr.expected_reports[t]),
      ]);
    }
    const total = sim.cases.reduce((a, b) => a + b, 0);
    reporter.info(`${place.name}: ${sim.dates.length} days, ${total} reported cases`);
  });
  const out = new OutputSet(options.out);
  out.add('cases.csv', toCsv(withRegion ? ['date', 'cases', 'region'] : ['date', 'cases'], caseRows));
  out.add(
    'truth.csv',
    toCsv(
      [
        'date',
        ...(withRegion ? ['region'] : []),
        'transmission_rate',
        'basic_reproduction',
        'effective_reproduction',
        'infections',
        'onsets',
        'expected_reports',
      ],
      truthRows,
    ),
  );
  out.commit();
  reporter.info(`wrote ${options.out}/cases.csv and ${options.out}/truth.csv`);
}
