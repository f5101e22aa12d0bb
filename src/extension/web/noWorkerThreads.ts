/**
 * Stands in for `node:worker_threads` in the web build (esbuild alias): there are no node worker threads in
 * the browser's extension host, so the loader runs jobs in-process there.
 */
export const Worker: undefined = undefined;
export const parentPort: null = null;
export const isMainThread = true;
