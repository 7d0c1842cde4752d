/**
 * `npm run demo`: the whole job on the invented Vell Basin sample — districts joined to their
 * polygons, queen neighbours, all three models, local statistics, a rate built from counts
 * (`--rate falls_per_1000=fall_admissions/residents_70plus`), the results workbook — then the villages sample
 * with 5-nearest neighbours. Prints a short summary, how well the simulated parameters came back,
 * and the output paths. Last, the no-install browser page as one file (sample-workbooks/out/spillway.html),
 * to hand to anyone who cannot install anything.
 */
import { mkdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { runAnalysis, type AnalysisRequest, type AnalysisResult } from '../src/pipeline/index.js';
import { readBoundaryFiles, readNamedFile } from '../src/cli/read-files.js';
import { writeResultsFile } from '../src/cli/write-results.js';
import { InputError } from '../src/errors.js';

const root = join(fileURLToPath(import.meta.url), '..', '..');
const samples = join(root, 'sample-workbooks');
const outDir = join(samples, 'out');

interface Demo {
  title: string;
  boundary: string;
  data: string;
  sheet: string;
  id: string;
  truth: string;
  request: Omit<AnalysisRequest, 'boundary' | 'data' | 'sheet' | 'id'>;
  out: string;
  parameter: 'lag' | 'error';
}

const demos: Demo[] = [
  {
    title: 'Vell Basin districts: share of workers with a long commute',
    boundary: 'vell-basin-districts.geojson', data: 'vell-basin.xlsx', sheet: 'Districts', id: 'district_id',
    truth: 'vell-basin-truth.json', out: 'vell-basin-results.xlsx', parameter: 'lag',
    request: { label: 'district_name', y: 'long_commute_pct', x: ['broadband_pct', 'rail_km', 'rent_index'], weights: { method: 'queen' }, transform: 'row', models: ['ols', 'lag', 'error'], compareWeights: 'suggested',
      local: { statistics: ['moran', 'gistar'], of: 'clinic_wait_days' },
      // the Rates sheet: fall admissions per 1,000 residents aged 70+, with a few very small districts among large ones
      rates: { recipes: [{ name: 'falls_per_1000', events: 'fall_admissions', population: 'residents_70plus', per: 1000 }], smoothing: 'local' } },
  },
  {
    title: 'Vell Basin villages: new small businesses per 1,000 residents',
    boundary: 'vell-basin-villages.geojson', data: 'vell-basin-villages.xlsx', sheet: 'Villages', id: 'village_id',
    truth: 'vell-basin-villages-truth.json', out: 'vell-basin-villages-results.xlsx', parameter: 'error',
    request: { label: 'village_name', y: 'new_business_per_1000', x: ['broadband_pct', 'town_km'], weights: { method: 'knn', k: 5 }, transform: 'row', models: ['ols', 'lag', 'error'] },
  },
];

async function runDemo(d: Demo): Promise<void> {
  const dataPath = join(samples, d.data);
  const data = readNamedFile(dataPath, 'data');
  const result = await runAnalysis({
    ...d.request,
    boundary: readBoundaryFiles(join(samples, d.boundary)),
    data,
    sheet: d.sheet,
    id: d.id,
  });
  const outPath = join(outDir, d.out);
  await writeResultsFile(result, outPath, { path: dataPath, bytes: data.bytes }, { replace: true });
  const truth = JSON.parse(readFileSync(join(samples, d.truth), 'utf8'));
  console.log(`\n${d.title}`);
  console.log(`  ${result.n} areas, ${result.weights.description}, ${result.weights.links} links`);
  console.log(`  Residual Moran's I ${result.ols.moran.I.toFixed(3)} (p ${result.ols.moran.p.toPrecision(2)}); ${result.ols.recommendation.text}`);
  console.log(recovered(result, d.parameter, truth));
  if (result.local?.results.moran && truth.planted_clusters) console.log(foundClusters(result, truth.planted_clusters));
  for (const r of result.rates ?? []) {
    const flagged = r.areas.filter((a) => a.flagged).length;
    console.log(`  Rate ${r.name}: ${flagged} of ${r.areas.length} areas flagged for few events; Moran's I of the raw rate ${r.moranRaw.I.toFixed(3)}, rate-adjusted ${r.ebMoran.I.toFixed(3)} (sheet "Rates")`);
  }
  console.log(`  Results workbook: ${relative(process.cwd(), outPath)}`);
}

function recovered(r: AnalysisResult, model: 'lag' | 'error', truth: Record<string, any>): string {
  const fit = r.fits[model]!;
  const symbol = model === 'lag' ? 'ρ' : 'λ';
  const simulated = model === 'lag' ? truth.rho : truth.lambda;
  const off = Math.abs(fit.parameter - simulated) / fit.parameterSe;
  return `  Simulated ${symbol} = ${simulated}; the ${model} model recovers ${fit.parameter.toFixed(3)} ± ${fit.parameterSe.toFixed(3)} ` +
    `(${off.toFixed(1)} standard errors away${off <= 3 ? ', within 3' : ', MORE than 3'})`;
}

function foundClusters(r: AnalysisResult, planted: { column: string; long_waits: string[]; short_waits: string[] }): string {
  const m = r.local!.results.moran!;
  const group = new Map(r.ids.map((id, i) => [id, m.categories![i]]));
  const high = planted.long_waits.filter((id) => group.get(id) === 'high-high').length;
  const low = planted.short_waits.filter((id) => group.get(id) === 'low-low').length;
  return `  Planted clusters in ${planted.column}: local Moran finds ${high} of ${planted.long_waits.length} long-wait and ${low} of ${planted.short_waits.length} short-wait districts (false discovery rate 0.05)`;
}

/** The one-file browser page, built into the demo's output folder (nothing else there is touched). */
async function buildOneFilePage(): Promise<void> {
  const { build } = await import('vite');
  await build({ configFile: join(root, 'addin/vite.page.config.ts'), logLevel: 'warn', build: { outDir, emptyOutDir: false } });
  console.log(`\nThe browser page as one file: ${relative(process.cwd(), join(outDir, 'spillway.html'))} (open it in a browser; no server, no installation)`);
}

mkdirSync(outDir, { recursive: true });
try {
  for (const d of demos) await runDemo(d);
  await buildOneFilePage();
  console.log('\nRead with care: associations between areas, not proof of cause; see the README\'s cautions.');
} catch (e) {
  console.error(e instanceof InputError ? `demo: ${e.message}` : e);
  process.exitCode = 1;
}
