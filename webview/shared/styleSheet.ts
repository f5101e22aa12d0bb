/** Adds a stylesheet to the page as a constructable sheet (no <style> element, so the strict CSP needs no exception). */
export function adoptStyleSheet(doc: Document, css: string): void {
  const sheet = new CSSStyleSheet();
  sheet.replaceSync(css);
  doc.adoptedStyleSheets = [...doc.adoptedStyleSheets, sheet];
}
