// What a .hbs import is, in the bundles (scripts/esbuild-options.mjs), under vitest
// (vitest.config.ts) and for scripts run from src (scripts/hbs-hooks.mjs): one module with the
// template's text (`default`) and the template compiled ahead of time (`template`, a Handlebars
// template specification for `Handlebars.template`), so a run never compiles a built-in template:
// compiling the report's templates at run time took about 0.18 s of every Action run's start.
import Handlebars from 'handlebars';

/**
 * The options every Leadline template is compiled with: the view escapes every string itself, so
 * Handlebars' HTML escaping is off (see src/report/markdown.ts, which compiles a user's template
 * with these same options).
 */
export const HBS_OPTIONS = { noEscape: true, strict: false };

/** The JavaScript module source of a .hbs file's text. */
export function hbsModule(text) {
  return `export default ${JSON.stringify(text)};\nexport const template = ${Handlebars.precompile(text, HBS_OPTIONS)};\n`;
}
