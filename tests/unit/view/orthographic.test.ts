import { describe, expect, it } from 'vitest';
import { ORTHOGRAPHIC_VIEWS, depth, project, silhouette, toSvg } from '../../../src/lib/view/orthographic';
import { objectSupport } from '../../../src/lib/view/scene-model';
import type { Vec3Tuple } from '../../../src/lib/sheet/types';

const view = (name: string) => ORTHOGRAPHIC_VIEWS.find((v) => v.name === name)!;
const cross = (a: Vec3Tuple, b: Vec3Tuple): Vec3Tuple => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];

describe('orthographic views', () => {
  it('have right-handed screen bases: right x up = toward the viewer', () => {
    for (const v of ORTHOGRAPHIC_VIEWS) expect(cross(v.right, v.up)).toEqual(v.toward);
  });

  it('project a point as worked by hand: top drops z, front drops y, side drops x', () => {
    const p: Vec3Tuple = [0.01, 0.02, 0.03];
    expect(project(p, view('top'))).toEqual([0.01, 0.02]);
    expect(project(p, view('front'))).toEqual([0.01, 0.03]);
    expect(project(p, view('side'))).toEqual([0.02, 0.03]);
    // Nearer the viewer: higher z from the top, lower y from the front (viewer at -y), higher x from the side (viewer at +x).
    expect(depth(p, view('top'))).toBe(0.03);
    expect(depth(p, view('front'))).toBe(-0.02);
    expect(depth(p, view('side'))).toBe(0.01);
  });

  it('flips the up axis for SVG, whose y grows downwards', () => {
    expect(toSvg([2, 3])).toEqual([2, -3]);
  });

  it('outlines a ball as a circle of its radius about its projected centre', () => {
    const centre: Vec3Tuple = [1, 2, 3];
    const outline = silhouette((d) => {
      const n = Math.hypot(...d);
      return [centre[0] + (2 * d[0]) / n, centre[1] + (2 * d[1]) / n, centre[2] + (2 * d[2]) / n];
    }, view('front'), 16);
    expect(outline).toHaveLength(16);
    for (const [u, v] of outline) expect(Math.hypot(u - 1, v - 3)).toBeCloseTo(2, 12);
    // First sample is the support in the +right direction: the rightmost point.
    expect(outline[0]![0]).toBeCloseTo(3, 12);
    expect(outline[0]![1]).toBeCloseTo(3, 12);
  });

  it('outlines a box turned 90 degrees about z with its x and y extents swapped in the top view', () => {
    const s = Math.SQRT1_2;
    const object = {
      shape: { kind: 'box' as const, halfExtents: [0.01, 0.02, 0.03] as Vec3Tuple, filletRadius: 0 },
      position: [0.1, 0, 0] as Vec3Tuple,
      orientation: [0, 0, s, s] as [number, number, number, number],
    };
    const outline = silhouette((d) => objectSupport(object, d), view('top'), 64);
    const us = outline.map(([u]) => u), vs = outline.map(([, v]) => v);
    expect(Math.min(...us)).toBeCloseTo(0.08, 12);
    expect(Math.max(...us)).toBeCloseTo(0.12, 12);
    expect(Math.min(...vs)).toBeCloseTo(-0.01, 12);
    expect(Math.max(...vs)).toBeCloseTo(0.01, 12);
    const side = silhouette((d) => objectSupport(object, d), view('side'), 64);
    expect(Math.max(...side.map(([, v]) => v))).toBeCloseTo(0.03, 12);
    expect(Math.max(...side.map(([u]) => u))).toBeCloseTo(0.01, 12);
  });
});
