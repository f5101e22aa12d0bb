import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

/** A maker of run folders under one fresh temporary folder: each call writes the files given into a new folder. */
export function runFolderMaker(prefix: string): (files: Record<string, string>) => string {
  const root = mkdtempSync(join(tmpdir(), prefix));
  let n = 0;
  return (files) => {
    const dir = join(root, `run${n++}`);
    mkdirSync(dir);
    for (const [name, text] of Object.entries(files)) writeFileSync(join(dir, name), text);
    return dir;
  };
}
