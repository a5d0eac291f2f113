/**
 * Three orthographic views of the world (palm) frame for the 2D fallback of the 3D view, each a
 * right-handed screen basis: `right` and `up` span the drawing plane and `toward` points at the
 * viewer, so right x up = toward. Top looks down the z axis, front looks along +y, side looks
 * along -x (from the +x side).
 */
import type { Vec3Tuple } from '../sheet/types';

export type ViewName = 'top' | 'front' | 'side';

export interface OrthographicView {
  name: ViewName;
  label: string;
  right: Vec3Tuple;
  up: Vec3Tuple;
  toward: Vec3Tuple;
  /** Axis names shown along the right and up screen directions. */
  axes: [string, string];
}

export const ORTHOGRAPHIC_VIEWS: readonly OrthographicView[] = [
  { name: 'top', label: 'Top (looking down z)', right: [1, 0, 0], up: [0, 1, 0], toward: [0, 0, 1], axes: ['x', 'y'] },
  { name: 'front', label: 'Front (looking along +y)', right: [1, 0, 0], up: [0, 0, 1], toward: [0, -1, 0], axes: ['x', 'z'] },
  { name: 'side', label: 'Side (looking along −x)', right: [0, 1, 0], up: [0, 0, 1], toward: [1, 0, 0], axes: ['y', 'z'] },
];

const dot = (a: Vec3Tuple, b: Vec3Tuple) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];

/** Screen coordinates [right, up] of a world point in the view, m (y up, as on paper). */
export function project(point: Vec3Tuple, view: OrthographicView): [number, number] {
  return [dot(point, view.right), dot(point, view.up)];
}

/** Distance of a point toward the viewer, m: larger is nearer, so draw in ascending order. */
export function depth(point: Vec3Tuple, view: OrthographicView): number {
  return dot(point, view.toward);
}

/**
 * Outline of a convex body seen in the view: the support points in `samples` directions of the
 * drawing plane, projected. For a convex body this traces its silhouette exactly at those directions.
 */
export function silhouette(supportPoint: (direction: Vec3Tuple) => Vec3Tuple, view: OrthographicView, samples = 48): [number, number][] {
  const outline: [number, number][] = [];
  for (let i = 0; i < samples; i++) {
    const angle = (2 * Math.PI * i) / samples;
    const c = Math.cos(angle), s = Math.sin(angle);
    const direction: Vec3Tuple = [
      c * view.right[0] + s * view.up[0],
      c * view.right[1] + s * view.up[1],
      c * view.right[2] + s * view.up[2],
    ];
    outline.push(project(supportPoint(direction), view));
  }
  return outline;
}

/** SVG coordinates of a screen point: x to the right, y downwards (SVG's), so the up axis flips. */
export function toSvg([right, up]: [number, number]): [number, number] {
  return [right, -up];
}
