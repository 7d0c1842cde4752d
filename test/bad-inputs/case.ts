/** One bad input: the files, what was asked of them, and the words the analyst must be shown. */
import type { AnalysisRequest } from '../../src/pipeline/index.js';
import type { WeightsSpec } from '../../src/weights/index.js';
import type { NamedBytes } from './make.js';

export interface CaseFiles {
  boundary: NamedBytes[];
  data?: NamedBytes;
  edgeList?: NamedBytes;
}

export interface BadInput {
  /** what is wrong, in a few words */
  name: string;
  /** the issue's heading this case belongs to */
  group: string;
  files: () => CaseFiles | Promise<CaseFiles>;
  /** changes to the base request (id code, y, x1 + x2, queen, row, OLS only) */
  request?: Partial<Pick<AnalysisRequest, 'id' | 'y' | 'x' | 'weights' | 'transform' | 'layer' | 'sheet' | 'dropMissing' | 'models' | 'maxBytes' | 'seed' | 'permutations' | 'impactDraws' | 'boundaryId'>>;
  /** fragments the message must contain (each a string, case-sensitive, or a pattern) */
  expect: (string | RegExp)[];
  /** 'refuse' (default): InputError / exit 2. 'warn': the run goes on and a warning names the fault. */
  outcome?: 'refuse' | 'warn';
  /**
   * How the command line meets this case: 'same' (default) writes the files and passes the request
   * as options; 'skip' when the case needs an engine option the command line does not have (with
   * `cliNote` saying which case covers it there).
   */
  cli?: 'same' | 'skip';
  cliNote?: string;
  /** Options added to the command line after the request's own (a later option of one name wins). */
  cliExtra?: string[];
  /** 'skip' for command-line syntax the engine's request cannot express (the rule "queen:2"). */
  engine?: 'run' | 'skip';
}

export const BASE: Pick<AnalysisRequest, 'id' | 'y' | 'x' | 'weights' | 'transform' | 'models'> = {
  id: 'code', y: 'y', x: ['x1', 'x2'], weights: { method: 'queen' }, transform: 'row', models: ['ols'],
};

/** The --weights text for a rule (the command line's own syntax). */
export function weightsRule(w: WeightsSpec): string {
  switch (w.method) {
    case 'queen':
    case 'rook':
      return w.method;
    case 'knn':
      return `knn:${w.k}`;
    case 'band':
      return `band:${w.distance}`;
    case 'idw':
      return `idw:${w.power}${w.cutoff !== undefined ? `:${w.cutoff}` : ''}`;
  }
}
