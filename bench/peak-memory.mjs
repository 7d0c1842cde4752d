// Preloaded into a benchmarked command (node --import): on exit, writes the process's peak resident
// memory in kB (worker threads included) to the file named by SPILLWAY_BENCH_PEAK_FILE.
import { writeFileSync } from 'node:fs';

const file = process.env.SPILLWAY_BENCH_PEAK_FILE;
if (file) process.on('exit', () => writeFileSync(file, String(process.resourceUsage().maxRSS)));
