// Types of scripts/hbs-module.mjs, for vitest.config.ts.
export declare const HBS_OPTIONS: { noEscape: boolean; strict: boolean };
export declare function hbsModule(text: string): string;
