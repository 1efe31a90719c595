// The package version: replaced at bundle time, read from package.json's value under vitest.
export const VERSION: string = typeof __LEADLINE_VERSION__ === 'string' ? __LEADLINE_VERSION__ : '0.0.0-dev';
