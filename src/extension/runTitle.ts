/**
 * What a run is called in tab titles and headers: its folder and file name (`si-bulk/EIGENVAL`), so two runs
 * whose eigenvalue files share a name can be told apart. Pure: takes the URI's path only.
 */
export function runTitle(path: string): string {
  const parts = path.split('/').filter(Boolean);
  if (parts.length === 0) return path;
  return parts.slice(-2).join('/');
}
