// The Action's entry point (bundled to dist/index.js): it only launches run(), so tests import run().
// The bundle is also the script of the analysis worker threads (src/pool.ts), which start nothing here.
import { isPoolWorker } from '../pool.js';
import { run } from './main.js';

if (!isPoolWorker()) void run();
