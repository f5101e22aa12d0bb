/**
 * Content detection for files whose names say nothing (e.g. `EIGENVAL.scf`, `bands_GGA.txt`, `pwscf.xml`):
 * when such a file opens as plain text or XML, the core's detectors look at its head and, if they recognise a
 * layout, the document is switched to the matching language (so the features below apply).
 */
import * as vscode from 'vscode';
import { DETECT_HEAD_BYTES, detectFormat } from '../core/formats/index';
import { GENERIC_LANGUAGES, isEigenvalueLanguage, languageForFormat } from './languageIds';
import { isAnnotationsPath } from '../core/annotations/annotationsModel';

/** Detection must be confident before a document's language is changed. */
const MIN_CONFIDENCE = 0.6;

export function registerContentDetection(): vscode.Disposable {
  const check = async (doc: vscode.TextDocument): Promise<void> => {
    // Our own languages too: an extension such as .bands is used by more than one code.
    if (!(GENERIC_LANGUAGES.includes(doc.languageId) || isEigenvalueLanguage(doc.languageId)) || doc.isUntitled) return;
    const name = doc.uri.path.split('/').pop() ?? '';
    if (isAnnotationsPath(name)) return;
    const headText = doc.getText(new vscode.Range(0, 0, Math.min(doc.lineCount, 400), 0)).slice(0, DETECT_HEAD_BYTES);
    const head = new TextEncoder().encode(headText).subarray(0, DETECT_HEAD_BYTES);
    const d = detectFormat(head, name);
    if (!d || d.confidence < MIN_CONFIDENCE) return;
    const lang = languageForFormat(d.reader.id);
    if (lang && lang !== doc.languageId) await vscode.languages.setTextDocumentLanguage(doc, lang);
  };
  for (const d of vscode.workspace.textDocuments) void check(d);
  return vscode.workspace.onDidOpenTextDocument((d) => void check(d));
}
