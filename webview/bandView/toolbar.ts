/**
 * The band view's header: run title and gap summary, the energy-zero and spin menus, zoom reset, export and
 * save buttons with the read-only note; below it the gap caution line and the banner of data warnings.
 */
import type { BandData, EnvironmentData } from '../../src/protocol';
import { el, setOptions, vsButton, vsSelect, type VsButton, type VsSelect } from '../shared/controls';
import { availableReferences, chooseReference, REFERENCE_NAMES } from './energyReference';
import { bannerLines, gapCaution, gapSummary } from './runSummary';
import type { ReferenceName, SpinName } from './viewState';

const SPIN_OPTIONS = [
  { value: 'up', label: 'Spin ↑ (channel 1)' },
  { value: 'down', label: 'Spin ↓ (channel 2)' },
  { value: 'both', label: 'Both channels' },
];

/** Why saving is off when the host gives no sentence for it. */
export const READ_ONLY_NOTE = 'This workspace is read-only, so annotations cannot be saved.';

function withClass<E extends HTMLElement>(e: E, cls: string): E {
  e.classList.add(cls);
  return e;
}

export class Toolbar {
  readonly bar = el('header', 'vs-bar');
  readonly cautionLine = el('p', 'vs-caution-line');
  readonly banner = el('p', 'vs-banner');
  readonly refSelect: VsSelect = withClass(vsSelect('Energy zero'), 'vs-ref');
  readonly spinSelect: VsSelect = withClass(vsSelect('Spin channel'), 'vs-spin');
  readonly resetButton: VsButton = withClass(vsButton('Reset zoom', true), 'vs-reset');
  readonly svgButton: VsButton = withClass(vsButton('Export SVG', true), 'vs-export-svg');
  readonly pngButton: VsButton = withClass(vsButton('Export PNG', true), 'vs-export-png');
  readonly saveButton: VsButton = withClass(vsButton('Save annotations'), 'vs-save');
  private readonly title = el('span', 'vs-title', 'Band view');
  private readonly gap = el('span', 'vs-gap');
  private readonly spinLabel = el('label', undefined, 'Spin');
  private readonly saveNote = el('span', 'vs-note vs-save-note');

  constructor() {
    const refLabel = el('label', undefined, 'Energy zero');
    refLabel.append(this.refSelect);
    this.spinLabel.append(this.spinSelect);
    this.spinLabel.hidden = true;
    this.bar.append(
      this.title,
      this.gap,
      refLabel,
      this.spinLabel,
      this.resetButton,
      this.svgButton,
      this.pngButton,
      this.saveButton,
      this.saveNote,
    );
    this.cautionLine.hidden = true;
    this.banner.hidden = true;
    this.banner.setAttribute('role', 'alert');
  }

  /** A run arrived: its title, the menus with the choices in force, the gap summary, caution and banner. */
  showRun(data: BandData, reference: ReferenceName, spin: SpinName): void {
    this.title.textContent = data.title;
    const levels = { vbm_eV: data.vbm_eV, fermiEnergy: data.fermiEnergy };
    setOptions(
      this.refSelect,
      availableReferences(levels).map((r) => ({ value: r, label: REFERENCE_NAMES[r] })),
      chooseReference(reference, levels).reference,
    );
    this.spinLabel.hidden = data.nSpin === 1;
    setOptions(this.spinSelect, SPIN_OPTIONS, spin);
    this.gap.textContent = gapSummary(data);
    this.gap.title = data.report.gapReason ?? data.report.classificationReason ?? '';
    const caution = gapCaution(data);
    this.cautionLine.hidden = !caution;
    this.cautionLine.textContent = caution ? `Caution: ${caution}` : '';
    const banners = bannerLines(data);
    this.banner.hidden = banners.length === 0;
    this.banner.textContent = banners.join(' ');
  }

  /** Save is off, with the reason beside it, in a read-only workspace. */
  showSaveState(env: EnvironmentData): void {
    this.saveButton.disabled = env.readOnly;
    if (env.readOnly) {
      const why = env.readOnlyReason ?? READ_ONLY_NOTE;
      this.saveButton.title = why;
      this.saveNote.textContent = why;
    } else {
      this.saveButton.title = 'Write the fits you made to the annotations file beside the run';
      this.saveNote.textContent = '';
    }
  }
}
