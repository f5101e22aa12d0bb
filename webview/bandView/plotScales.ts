/**
 * The plot's geometry: margins, the base scales (the whole path; an energy window around the band edges),
 * the d3 zoom on the SVG overlay and the zoomed scales drawn with. `defaultEnergyWindow` is pure.
 */
import type { Selection } from 'd3-selection';
import { scaleLinear, type ScaleLinear } from 'd3-scale';
import { zoom as d3zoom, zoomIdentity, type ZoomBehavior, type ZoomTransform } from 'd3-zoom';
import type { ViewModel } from './viewModel';

export const MARGIN = { top: 12, right: 14, bottom: 44, left: 58 };

export type Scale = ScaleLinear<number, number>;
export type OverlaySvg = Selection<SVGSVGElement, unknown, null, undefined>;

/**
 * The initial energy window (relative to the plot's zero `offset`): from 6 eV below the VBM to 5 eV above the
 * CBM, or ±6 eV around the Fermi energy, kept within the data (plus 0.3 eV); the whole data when that is empty.
 */
export function defaultEnergyWindow(vm: ViewModel, offset: number): [number, number] {
  const lowData = vm.energyMin - offset;
  const highData = vm.energyMax - offset;
  let lo: number;
  let hi: number;
  const v = vm.data.vbm_eV;
  const c = vm.data.cbm_eV;
  if (v !== null) {
    lo = v - offset - 6;
    hi = (c ?? v) - offset + 5;
  } else if (vm.data.fermiEnergy !== null) {
    lo = vm.data.fermiEnergy - offset - 6;
    hi = vm.data.fermiEnergy - offset + 6;
  } else {
    lo = lowData;
    hi = highData;
  }
  lo = Math.max(lo, lowData - 0.3);
  hi = Math.min(hi, highData + 0.3);
  if (!(hi > lo)) {
    lo = lowData - 0.5;
    hi = highData + 0.5;
  }
  return [lo, hi];
}

export class PlotScales {
  transform: ZoomTransform = zoomIdentity;
  /** Scales with the zoom applied (what is drawn). */
  zx: Scale = scaleLinear();
  zy: Scale = scaleLinear();
  width = 0;
  height = 0;
  private baseX: Scale = scaleLinear();
  private baseY: Scale = scaleLinear();
  private readonly behavior: ZoomBehavior<SVGSVGElement, unknown>;

  constructor(
    private readonly svg: OverlaySvg,
    onZoom: () => void,
  ) {
    this.behavior = d3zoom<SVGSVGElement, unknown>()
      .scaleExtent([1, 20000])
      .on('zoom', (ev: { transform: ZoomTransform }) => {
        this.transform = ev.transform;
        onZoom();
      });
    svg.call(this.behavior).on('dblclick.zoom', null);
  }

  /** Plot area width and height inside the margins, CSS px. */
  get pw(): number {
    return this.width - MARGIN.left - MARGIN.right;
  }
  get ph(): number {
    return this.height - MARGIN.top - MARGIN.bottom;
  }

  /** New size of the plot element (CSS px): the zoom's extents follow. */
  resize(width: number, height: number): void {
    this.width = Math.max(50, Math.floor(width));
    this.height = Math.max(50, Math.floor(height));
    const right = MARGIN.left + this.pw;
    this.behavior.extent([
      [MARGIN.left, MARGIN.top],
      [right, MARGIN.top + this.ph],
    ]);
    this.behavior.translateExtent([
      [MARGIN.left, -Infinity],
      [right, Infinity],
    ]);
  }

  /** The unzoomed view: the whole path; energies from defaultEnergyWindow. */
  setBase(vm: ViewModel | null, offset: number): void {
    if (!vm || vm.nk === 0) return;
    const x0 = vm.distance[0]!;
    const x1 = vm.distance[vm.nk - 1]!;
    this.baseX = scaleLinear()
      .domain([x0, x1 > x0 ? x1 : x0 + 1])
      .range([MARGIN.left, MARGIN.left + this.pw]);
    this.baseY = scaleLinear()
      .domain(defaultEnergyWindow(vm, offset))
      .range([MARGIN.top + this.ph, MARGIN.top]);
  }

  /** Applies the current zoom to the base scales. */
  rescale(): void {
    this.zx = this.transform.rescaleX(this.baseX);
    this.zy = this.transform.rescaleY(this.baseY);
  }

  reset(): void {
    this.transform = zoomIdentity;
    this.behavior.transform(this.svg, zoomIdentity);
  }

  scaleBy(factor: number): void {
    this.behavior.scaleBy(this.svg, factor);
  }

  /** Sets the zoom transform (scale k, translation x, y) as a wheel or drag would. */
  setZoom(k: number, x: number, y: number): void {
    this.behavior.transform(this.svg, zoomIdentity.translate(x, y).scale(k));
  }

  /** Pans so that (distance, energy) is at the centre of the plot. */
  centreOn(distance: number, energy: number): void {
    this.behavior.translateTo(this.svg, this.baseX(distance), this.baseY(energy));
  }

  /** Whether a screen point lies inside the plot area. */
  inside(p: { x: number; y: number }): boolean {
    return p.x >= MARGIN.left && p.x <= MARGIN.left + this.pw && p.y >= MARGIN.top && p.y <= MARGIN.top + this.ph;
  }
}
