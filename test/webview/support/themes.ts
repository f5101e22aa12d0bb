/**
 * Theme variables for the test page, standing in for what VS Code sets on a webview's <html> element.
 * The values follow VS Code's built-in Dark Modern, Light Modern and High Contrast themes (memory; only
 * used to check that the view picks colours up from these variables, not as reference data).
 */
export type TestTheme = 'dark' | 'light' | 'hc';

export const THEME_VARS: Record<TestTheme, Record<string, string>> = {
  dark: {
    '--vscode-editor-background': '#1f1f1f',
    '--vscode-editor-foreground': '#cccccc',
    '--vscode-foreground': '#cccccc',
    '--vscode-descriptionForeground': '#9d9d9d',
    '--vscode-focusBorder': '#0078d4',
    '--vscode-charts-foreground': '#cccccc',
    '--vscode-charts-blue': '#3794ff',
    '--vscode-charts-orange': '#d18616',
    '--vscode-charts-green': '#89d185',
    '--vscode-charts-purple': '#b180d7',
    '--vscode-charts-yellow': '#cca700',
    '--vscode-charts-red': '#f14c4c',
    '--vscode-editorIndentGuide-background1': '#404040',
    '--vscode-panel-border': '#2b2b2b',
    '--vscode-editorWarning-foreground': '#cca700',
    '--vscode-font-family': 'system-ui, sans-serif',
    '--vscode-font-size': '13px',
  },
  light: {
    '--vscode-editor-background': '#ffffff',
    '--vscode-editor-foreground': '#3b3b3b',
    '--vscode-foreground': '#3b3b3b',
    '--vscode-descriptionForeground': '#717171',
    '--vscode-focusBorder': '#005fb8',
    '--vscode-charts-foreground': '#616161',
    '--vscode-charts-blue': '#1a85ff',
    '--vscode-charts-orange': '#d18616',
    '--vscode-charts-green': '#388a34',
    '--vscode-charts-purple': '#652d90',
    '--vscode-charts-yellow': '#bf8803',
    '--vscode-charts-red': '#e51400',
    '--vscode-editorIndentGuide-background1': '#d3d3d3',
    '--vscode-panel-border': '#e5e5e5',
    '--vscode-editorWarning-foreground': '#bf8803',
    '--vscode-font-family': 'system-ui, sans-serif',
    '--vscode-font-size': '13px',
  },
  hc: {
    '--vscode-editor-background': '#000000',
    '--vscode-editor-foreground': '#ffffff',
    '--vscode-foreground': '#ffffff',
    '--vscode-descriptionForeground': '#ffffff',
    '--vscode-focusBorder': '#f38518',
    '--vscode-contrastBorder': '#6fc3df',
    '--vscode-charts-foreground': '#ffffff',
    '--vscode-charts-blue': '#3794ff',
    '--vscode-charts-orange': '#d18616',
    '--vscode-charts-green': '#89d185',
    '--vscode-charts-purple': '#b180d7',
    '--vscode-charts-yellow': '#ffd700',
    '--vscode-charts-red': '#f14c4c',
    '--vscode-panel-border': '#6fc3df',
    '--vscode-editorWarning-foreground': '#ffd700',
    '--vscode-font-family': 'system-ui, sans-serif',
    '--vscode-font-size': '13px',
  },
};

export const BODY_CLASS: Record<TestTheme, { cls: string; kind: string }> = {
  dark: { cls: 'vscode-dark', kind: 'vscode-dark' },
  light: { cls: 'vscode-light', kind: 'vscode-light' },
  hc: { cls: 'vscode-high-contrast', kind: 'vscode-high-contrast' },
};
