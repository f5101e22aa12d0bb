// Types of browserCheck.mjs, for the tests.
export interface Machine {
  exists(path: string): boolean;
  isRoot(): boolean;
  install(): number;
  log(text: string): void;
}
export interface BrowserCheck {
  ok: boolean;
  installed: boolean;
  sentence: string | null;
}
export const BROWSER_PATH: string;
export const INSTALL_COMMAND: string;
export const BROWSER_ARGS: string[];
export function missingBrowserSentence(path?: string): string;
export function ensureBrowser(machine: Machine, path?: string): BrowserCheck;
export const realMachine: Machine;
