// The Action's entry point (bundled to dist/index.js): it only launches run(), so tests import run().
import { run } from './main.js';

void run();
