/**
 * Zoom and pan of a shared x axis (time, s) for charts shown together: every operation takes the
 * visible range and the data's full range and answers a new visible range that stays inside the
 * data and never shrinks below a sliver of it, so a chart cannot be zoomed or panned into nothing.
 */

export interface XRange {
  min: number;
  max: number;
}

/** The narrowest visible range, as a share of the full range (a 100,000-sample log still shows ten samples). */
export const MIN_SPAN_FRACTION = 1e-4;

/** Zoom per wheel pixel: a notch of about 100 px scales the span by e^0.2 ≈ 1.22. */
const WHEEL_RATE = 0.002;
/** Pixels per wheel line, for wheels that report lines (deltaMode 1) rather than pixels. */
const LINE_PIXELS = 16;

function spanLimits(bounds: XRange): { full: number; least: number } {
  const full = bounds.max - bounds.min;
  return { full, least: full * MIN_SPAN_FRACTION };
}

/** The range moved and narrowed as little as needed to lie inside `bounds` and be at least the narrowest span wide. */
export function clampRange(range: XRange, bounds: XRange): XRange {
  const { full, least } = spanLimits(bounds);
  if (!(full > 0)) return { ...bounds };
  let span = range.max - range.min;
  if (!Number.isFinite(span) || span >= full) return { ...bounds };
  const middle = Number.isFinite(range.min + span / 2) ? range.min + span / 2 : (bounds.min + bounds.max) / 2;
  if (span < least) span = least;
  let min = middle - span / 2;
  if (min < bounds.min) min = bounds.min;
  if (min + span > bounds.max) min = bounds.max - span;
  return { min, max: min + span };
}

/** The range scaled by `factor` (below 1 zooms in) about `anchor`, which keeps its place on screen. */
export function zoomAt(range: XRange, anchor: number, factor: number, bounds: XRange): XRange {
  const at = Number.isFinite(anchor) ? Math.min(range.max, Math.max(range.min, anchor)) : (range.min + range.max) / 2;
  const scale = Number.isFinite(factor) && factor > 0 ? factor : 1;
  return clampRange({ min: at - (at - range.min) * scale, max: at + (range.max - at) * scale }, bounds);
}

/** The range shifted by `delta` (s), stopping at the data's ends. */
export function panBy(range: XRange, delta: number, bounds: XRange): XRange {
  const shift = Number.isFinite(delta) ? delta : 0;
  const span = range.max - range.min;
  let min = Math.min(Math.max(range.min + shift, bounds.min), bounds.max - span);
  if (min < bounds.min) min = bounds.min;
  return clampRange({ min, max: min + span }, bounds);
}

/** The shift in x of a pointer drag of `pixels` across a plot `width` pixels wide showing `range`: dragging right moves the view left. */
export function dragShift(range: XRange, pixels: number, width: number): number {
  return width > 0 ? (-pixels / width) * (range.max - range.min) : 0;
}

/** The zoom factor of one wheel event: scrolling down (positive delta) zooms out. */
export function wheelFactor(deltaY: number, deltaMode: number): number {
  const pixels = deltaMode === 1 ? deltaY * LINE_PIXELS : deltaMode === 2 ? deltaY * 400 : deltaY;
  return Number.isFinite(pixels) ? Math.exp(pixels * WHEEL_RATE) : 1;
}

/** The range selected by dragging from one x to another, or null for a click (narrower than the narrowest span). */
export function rangeBetween(a: number, b: number, bounds: XRange): XRange | null {
  const { least } = spanLimits(bounds);
  if (!Number.isFinite(a) || !Number.isFinite(b) || Math.abs(b - a) < least) return null;
  return clampRange({ min: Math.min(a, b), max: Math.max(a, b) }, bounds);
}

/** Whether the range shows all the data (within a millionth of its span). */
export function showsAll(range: XRange | null, bounds: XRange): boolean {
  if (range === null) return true;
  const slack = (bounds.max - bounds.min) * 1e-6;
  return range.min <= bounds.min + slack && range.max >= bounds.max - slack;
}
