// Handlebars templates are bundled as text (esbuild loader 'text'; a small plugin in vitest.config.ts).
declare module '*.hbs' {
  const text: string;
  export default text;
}
/** Package version, replaced at bundle time (see scripts/bundle.mjs); src/version.ts falls back. */
declare const __LEADLINE_VERSION__: string | undefined;
