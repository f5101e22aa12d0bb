/** The commands (ids in commandIds.ts; titles in package.json; documented in test/editor/HOOKS.md). */
import * as vscode from 'vscode';
import { COMMANDS } from './commandIds';
import type { RunStore } from './runStore';
import type { BandViewPanels } from './bandViewPanels';
import { isEigenvalueLanguage } from './languageIds';
import { summaryUri } from './summaryDocuments';
import { saveAnnotations, type SaveDeps, type SaveOutcome } from './saveAnnotations';
import { ViewToHostType, type ExportFormat } from '../protocol';
import { writeRefusal } from './trust';
import { isFolder, pickRunInFolder } from './pickRun';
import { runTitle } from './runTitle';
import { gapStatusText } from './gapText';

function activeRunUri(panels: BandViewPanels): vscode.Uri | null {
  const ed = vscode.window.activeTextEditor;
  if (ed && isEigenvalueLanguage(ed.document.languageId)) return ed.document.uri;
  return panels.focused?.runUri ?? null;
}

function asUri(x: unknown): vscode.Uri | null {
  return x instanceof vscode.Uri ? x : null;
}

const NO_FILE = 'Open an eigenvalue file (EIGENVAL, vasprun.xml, QE XML, bands.x output, Wannier90 _band.dat, BXSF, CASTEP .bands) first.';

export function registerCommands(store: RunStore, panels: BandViewPanels, saveDeps: SaveDeps): vscode.Disposable {
  const reg = vscode.commands.registerCommand;
  return vscode.Disposable.from(
    reg(COMMANDS.openBandView, async (arg?: unknown) => {
      let uri = asUri(arg) ?? activeRunUri(panels) ?? vscode.window.activeTextEditor?.document.uri ?? null;
      if (!uri) {
        void vscode.window.showWarningMessage(NO_FILE);
        return;
      }
      // A folder (from the Explorer): the runs under it, one picked.
      if (await isFolder(uri)) {
        uri = await pickRunInFolder(uri, saveDeps.settings().maxBytes);
        if (!uri) return;
      }
      void store.get(uri).catch(() => undefined);
      await panels.open(uri);
    }),
    reg(COMMANDS.saveAnnotations, async (): Promise<SaveOutcome> => {
      const panel = panels.focused ?? panels.forUri(activeRunUri(panels));
      let outcome: SaveOutcome;
      const refusal = writeRefusal(panel?.runUri ?? activeRunUri(panels));
      if (refusal) {
        // Restricted Mode or a read-only file system: say so at once; the view would not answer.
        void vscode.window.showWarningMessage(refusal);
        return { ok: false, message: refusal };
      }
      if (panel) {
        outcome = await panel.requestSave();
        if (outcome.ok) void vscode.window.showInformationMessage(outcome.message);
        else void vscode.window.showWarningMessage(outcome.message);
      } else {
        const uri = activeRunUri(panels);
        if (!uri) outcome = { ok: false, message: NO_FILE };
        else {
          try {
            outcome = await saveAnnotations(await store.get(uri), { type: ViewToHostType.Save, entries: [] }, saveDeps);
          } catch (e) {
            outcome = { ok: false, message: e instanceof Error ? e.message : String(e) };
          }
        }
        if (outcome.ok) void vscode.window.showInformationMessage(outcome.message);
        else void vscode.window.showWarningMessage(outcome.message);
      }
      return outcome;
    }),
    reg(COMMANDS.exportPlot, async (formatArg?: unknown, targetArg?: unknown): Promise<string> => {
      const panel = panels.focused ?? panels.forUri(activeRunUri(panels)) ?? panels.any;
      if (!panel) {
        const m = 'Open the band view first (Valleyscope: Open Band View): the plot is exported from it.';
        void vscode.window.showWarningMessage(m);
        return m;
      }
      let format: ExportFormat | null = formatArg === 'svg' || formatArg === 'png' ? formatArg : null;
      if (!format) {
        const pick = await vscode.window.showQuickPick(
          [
            { label: 'SVG', description: 'vector, for papers and slides', value: 'svg' as const },
            { label: 'PNG', description: 'image at publication resolution', value: 'png' as const },
          ],
          { title: 'Export band plot as' },
        );
        if (!pick) return 'Export cancelled.';
        format = pick.value;
      }
      const refusal = writeRefusal(panel.runUri);
      if (refusal) {
        const m = refusal.replace('write annotations', 'export plots');
        void vscode.window.showWarningMessage(m);
        return m;
      }
      const r = await panel.requestExport(format, asUri(targetArg));
      if (r.ok) void vscode.window.showInformationMessage(r.message);
      else void vscode.window.showWarningMessage(r.message);
      return r.message;
    }),
    reg(COMMANDS.reload, async (arg?: unknown) => {
      const uri = asUri(arg) ?? activeRunUri(panels);
      if (!uri) {
        void vscode.window.showWarningMessage(NO_FILE);
        return;
      }
      // Say what happened: the gap read again, or why it could not be read.
      const name = runTitle(uri.path);
      try {
        const run = await store.reload(uri);
        vscode.window.setStatusBarMessage(`Valleyscope: ${name} read again: ${gapStatusText(run.report, run.bs.partial)}.`, 6000);
      } catch (e) {
        void vscode.window.showWarningMessage(`${name} could not be read again: ${e instanceof Error ? e.message : String(e)}`);
      }
    }),
    reg(COMMANDS.showSummary, async (arg?: unknown) => {
      const uri = asUri(arg) ?? activeRunUri(panels);
      if (!uri) {
        void vscode.window.showWarningMessage(NO_FILE);
        return;
      }
      try {
        await store.get(uri);
        const doc = await vscode.workspace.openTextDocument(summaryUri(uri));
        await vscode.window.showTextDocument(doc, { viewColumn: vscode.ViewColumn.Beside, preview: true });
      } catch (e) {
        void vscode.window.showErrorMessage(e instanceof Error ? e.message : String(e));
      }
    }),
  );
}
