// A Handlebars template: its text, and the template compiled ahead of time (scripts/hbs-module.mjs).
declare module '*.hbs' {
  const text: string;
  export default text;
  export const template: TemplateSpecification;
}
/** Package version, replaced at bundle time (see scripts/bundle.mjs); src/version.ts falls back. */
declare const __LEADLINE_VERSION__: string | undefined;
