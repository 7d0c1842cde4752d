/** Entry for functions.js: registers the SPILL cell functions in the shared runtime. */
import { registerCellFunctions } from './functions.js';

registerCellFunctions();
