/**
 * The one browser Farfield drives (bench and browser tests): Debian's
 * Chromium through playwright-core, never a downloaded one, with the flags a
 * headless run without GPU or network needs.
 */
export const CHROMIUM = '/usr/bin/chromium';
export const CHROMIUM_ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'];
