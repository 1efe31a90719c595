// node --import tsx --import ./scripts/register-hbs.mjs script.ts
import { register } from 'node:module';

register('./hbs-hooks.mjs', import.meta.url);
