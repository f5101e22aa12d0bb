/** Axis pieces both plots of the compare view draw (SVG through d3): numeric axes with true minus signs, axis titles. */
import type { Selection } from 'd3-selection';
import type { Axis } from 'd3-axis';
import type { NumberValue } from 'd3-scale';
import { minus } from '../shared/format';

export type SvgSelection = Selection<SVGSVGElement, unknown, null, undefined>;

/** A numeric axis in a group of class `cls` at `transform`, with `ticks` ticks. */
export function appendNumberAxis(svg: SvgSelection, cls: string, transform: string, axis: Axis<NumberValue>, ticks: number): void {
  svg
    .append('g')
    .attr('class', cls)
    .attr('transform', transform)
    .call(axis.ticks(ticks).tickFormat((d) => minus(String(d))));
}

/**
 * The horizontal axis title centred at `xCentre` near the bottom of an SVG `height` px high, and the vertical
 * one (rotated, centred at `yCentre`), returned empty for the caller's text.
 */
export function appendAxisTitles(
  svg: SvgSelection,
  xCentre: number,
  height: number,
  yCentre: number,
  xTitle: string,
): Selection<SVGTextElement, unknown, null, undefined> {
  svg
    .append('text')
    .attr('class', 'cv-axis-title')
    .attr('x', xCentre)
    .attr('y', height - 6)
    .attr('text-anchor', 'middle')
    .text(xTitle);
  return svg
    .append('text')
    .attr('class', 'cv-axis-title')
    .attr('transform', `translate(14,${yCentre}) rotate(-90)`)
    .attr('text-anchor', 'middle');
}
