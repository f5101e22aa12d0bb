/**
 * Theme changes: VS Code updates the body's classes and the CSS variables on <html> when the user switches
 * colour theme; `onChange` runs after each such change.
 */
export function watchTheme(doc: Document, onChange: () => void): MutationObserver {
  const mo = new MutationObserver(onChange);
  mo.observe(doc.body, { attributes: true, attributeFilter: ['class', 'data-vscode-theme-kind'] });
  mo.observe(doc.documentElement, { attributes: true, attributeFilter: ['style', 'class'] });
  return mo;
}
