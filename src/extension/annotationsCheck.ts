/**
 * Problems in an annotations file being edited by hand: what the annotations reader refuses (bad JSON, a key
 * written twice, conflict markers, a wrong type), with line and column, and the remarks it makes while
 * reading (an unknown review status, an id that does not match). Pure.
 */
import { parseAnnotations } from '../core/annotations/parseAnnotations';
import { itemsFromError, type DiagnosticItem } from './diagnosticItems';

export function annotationsProblems(text: string, name: string): DiagnosticItem[] {
  const warnings: string[] = [];
  try {
    parseAnnotations(text, name, warnings);
  } catch (e) {
    return itemsFromError(e);
  }
  return warnings.map((message) => ({ line: 0, column: 0, wholeLine: true, severity: 'warning' as const, message, code: 'annotations' }));
}
