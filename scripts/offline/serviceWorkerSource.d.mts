/** The text of sw.js for a build's files (relative paths) and content hash `version`. */
export function serviceWorkerSource(version: string, files: readonly string[]): string;
