/**
 * Stands in for `node:fs/promises` in the web build (esbuild alias): the browser's extension host has no local
 * files, so the accessor reads through vscode.workspace.fs only.
 */
export const open: undefined = undefined;
export const stat: undefined = undefined;
export const realpath: undefined = undefined;
export const constants: undefined = undefined;
