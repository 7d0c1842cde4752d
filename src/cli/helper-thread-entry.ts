/** Entry of the command line's second thread (see helper-thread.ts). */
import { workerData } from 'node:worker_threads';
import { serveHelper, type HelperInit } from '../linalg/index.js';

serveHelper(workerData as HelperInit);
