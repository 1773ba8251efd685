import type { Plugin } from 'vite';

export const SERVICE_WORKER_FILE: string;
/** The files to cache besides the page: relative paths with '/', sorted; not sw.js, index.html or source maps. */
export function offlineFiles(outDir: string): string[];
/** Writes sw.js into `outDir` for the files there; returns the cache version (a content hash). */
export function serviceWorkerWrite(outDir: string): string;
/** The plugin (production builds only). */
export function offlinePlugin(): Plugin;
