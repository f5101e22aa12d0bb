/** DOM helpers shared by the webviews: plain elements and the @vscode-elements controls they use. */

export type VsButton = HTMLElement & { disabled: boolean };
export type VsSelect = HTMLElement & { value: string };

export function el<K extends keyof HTMLElementTagNameMap>(tag: K, cls?: string, text?: string): HTMLElementTagNameMap[K] {
  const e = document.createElement(tag);
  if (cls) e.className = cls;
  if (text !== undefined) e.textContent = text;
  return e;
}

export function vsButton(label: string, secondary = false): VsButton {
  const b = document.createElement('vscode-button') as unknown as VsButton;
  b.textContent = label;
  if (secondary) b.setAttribute('secondary', '');
  return b;
}

export function vsSelect(label: string): VsSelect {
  const s = document.createElement('vscode-single-select') as unknown as VsSelect;
  s.setAttribute('aria-label', label);
  return s;
}

export function setOptions(sel: VsSelect, options: { value: string; label: string }[], current: string): void {
  sel.replaceChildren(
    ...options.map((o) => {
      const opt = document.createElement('vscode-option');
      opt.setAttribute('value', o.value);
      opt.textContent = o.label;
      if (o.value === current) opt.setAttribute('selected', '');
      return opt;
    }),
  );
  sel.value = current;
}
