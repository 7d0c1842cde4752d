import { main } from './run.js';

main(process.argv.slice(2)).then((code) => { process.exitCode = code; });
