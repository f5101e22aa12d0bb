/**
 * The fit-window slider is logarithmic, like the window-scan plot's axis: equal slider distances are equal
 * ratios of window (1 → 3 meV moves as far as 30 → 90 meV). Positions are integers 0 … WINDOW_SLIDER_STEPS.
 */
export const WINDOW_MIN_MEV = 1;
export const WINDOW_MAX_MEV = 300;
export const WINDOW_SLIDER_STEPS = 1000;

/** The window (meV) at a slider position, rounded to what the field shows: 0.1 meV below 10 meV, 1 meV above. */
export function windowAtSlider(position: number): number {
  const f = Math.min(1, Math.max(0, position / WINDOW_SLIDER_STEPS));
  const w = WINDOW_MIN_MEV * (WINDOW_MAX_MEV / WINDOW_MIN_MEV) ** f;
  return w < 10 ? Math.round(w * 10) / 10 : Math.round(w);
}

/** The slider position of a window (meV), clamped to the slider's range. */
export function sliderAtWindow(window_meV: number): number {
  if (!(window_meV > 0)) return 0;
  const f = Math.log(window_meV / WINDOW_MIN_MEV) / Math.log(WINDOW_MAX_MEV / WINDOW_MIN_MEV);
  return Math.round(Math.min(1, Math.max(0, f)) * WINDOW_SLIDER_STEPS);
}
