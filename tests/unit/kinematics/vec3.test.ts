import { describe, expect, it } from 'vitest';
import { glMatrix, vec3 as glVec3 } from 'gl-matrix';
import {
  add, copy, cross, distance, distanceSquared, dot, equals, lerp, negate, norm, normSquared,
  normalize, perpendicular, project, reject, scale, scaleAndAdd, set, sub, vec3,
} from '../../../src/lib/kinematics/vec3';

// Double precision in gl-matrix so it can serve as a reference to 12 digits.
glMatrix.setMatrixArrayType(Array);

// Reference: gl-matrix 3.4 vec3 (general-purpose vector library), used only as an outside check.
const a = [1.5, -2.25, 3.125];
const b = [-0.5, 4, 2.75];

function gl(v: number[]): glVec3 {
  return glVec3.fromValues(v[0], v[1], v[2]);
}

describe('vec3', () => {
  it('makes a plain array', () => {
    expect(vec3(1, 2, 3)).toEqual([1, 2, 3]);
    expect(vec3()).toEqual([0, 0, 0]);
  });
});

describe('set', () => {
  it('writes into a Float64Array', () => {
    const out = new Float64Array(3);
    expect(set(1, 2, 3, out)).toBe(out);
    expect(out).toBeNear([1, 2, 3], { digits: 12 });
  });
});

describe('copy', () => {
  it('copies into separate output', () => {
    const c = copy(a);
    expect(c).toEqual(a);
    expect(c).not.toBe(a);
  });
});

describe('add', () => {
  it('matches gl-matrix vec3.add', () => expect(add(a, b)).toBeNear(glVec3.add(glVec3.create(), gl(a), gl(b)), { digits: 12 }));
  it('output may alias an input', () => {
    const x = [...a];
    add(x, b, x);
    expect(x).toBeNear(glVec3.add(glVec3.create(), gl(a), gl(b)), { digits: 12 });
  });
  it('leaves the inputs untouched', () => {
    const x = [...a], y = [...b];
    add(x, y, new Float64Array(3));
    expect(x).toEqual(a);
    expect(y).toEqual(b);
  });
});

describe('sub', () => {
  it('matches gl-matrix vec3.subtract', () => expect(sub(a, b)).toBeNear(glVec3.subtract(glVec3.create(), gl(a), gl(b)), { digits: 12 }));
  it('output may alias the second input', () => {
    const y = [...b];
    sub(a, y, y);
    expect(y).toBeNear(glVec3.subtract(glVec3.create(), gl(a), gl(b)), { digits: 12 });
  });
});

describe('scale', () => {
  it('matches gl-matrix vec3.scale', () => expect(scale(a, -1.75)).toBeNear(glVec3.scale(glVec3.create(), gl(a), -1.75), { digits: 12 }));
});

describe('scaleAndAdd', () => {
  it('matches gl-matrix vec3.scaleAndAdd', () =>
    expect(scaleAndAdd(a, b, 0.3)).toBeNear(glVec3.scaleAndAdd(glVec3.create(), gl(a), gl(b), 0.3), { digits: 12 }));
});

describe('negate', () => {
  it('matches gl-matrix vec3.negate', () => expect(negate(a)).toBeNear(glVec3.negate(glVec3.create(), gl(a)), { digits: 12 }));
});

describe('lerp', () => {
  it('matches gl-matrix vec3.lerp', () => expect(lerp(a, b, 0.25)).toBeNear(glVec3.lerp(glVec3.create(), gl(a), gl(b), 0.25), { digits: 12 }));
});

describe('dot', () => {
  it('matches gl-matrix vec3.dot', () => expect(dot(a, b)).toBeCloseTo(glVec3.dot(gl(a), gl(b)), 12));
});

describe('cross', () => {
  it('matches gl-matrix vec3.cross', () => expect(cross(a, b)).toBeNear(glVec3.cross(glVec3.create(), gl(a), gl(b)), { digits: 12 }));
  it('is right-handed: x cross y = z (common practice)', () => expect(cross([1, 0, 0], [0, 1, 0])).toEqual([0, 0, 1]));
  it('output may alias the first input', () => {
    const x = [...a];
    cross(x, b, x);
    expect(x).toBeNear(glVec3.cross(glVec3.create(), gl(a), gl(b)), { digits: 12 });
  });
});

describe('norm', () => {
  it('matches gl-matrix vec3.length', () => expect(norm(a)).toBeCloseTo(glVec3.length(gl(a)), 12));
  it('gives 5 for (3, 4, 0) (Pythagorean triple)', () => expect(norm([3, 4, 0])).toBe(5));
});

describe('normSquared', () => {
  it('matches gl-matrix vec3.squaredLength', () => expect(normSquared(a)).toBeCloseTo(glVec3.squaredLength(gl(a)), 12));
});

describe('normalize', () => {
  it('matches gl-matrix vec3.normalize', () => expect(normalize(a)).toBeNear(glVec3.normalize(glVec3.create(), gl(a)), { digits: 12 }));
  it('keeps the zero vector zero', () => expect(normalize([0, 0, 0])).toEqual([0, 0, 0]));
});

describe('distance', () => {
  it('matches gl-matrix vec3.distance', () => expect(distance(a, b)).toBeCloseTo(glVec3.distance(gl(a), gl(b)), 12));
});

describe('distanceSquared', () => {
  it('matches gl-matrix vec3.squaredDistance', () =>
    expect(distanceSquared(a, b)).toBeCloseTo(glVec3.squaredDistance(gl(a), gl(b)), 12));
});

describe('perpendicular', () => {
  it('gives a unit vector orthogonal to each input', () => {
    for (const v of [a, b, [1, 0, 0], [0, 0, -2], [0, 1e-9, 1]]) {
      const p = perpendicular(v);
      expect(norm(p)).toBeCloseTo(1, 14);
      expect(dot(p, v) / norm(v)).toBeCloseTo(0, 14);
    }
  });
});

describe('project', () => {
  it('keeps the component along n', () => expect(project([2, 3, 4], [0, 0, 1])).toEqual([0, 0, 4]));
});

describe('reject', () => {
  it('removes the component along n', () => expect(reject([2, 3, 4], [0, 0, 1])).toEqual([2, 3, 0]));
});

describe('equals', () => {
  it('accepts rounding differences and rejects real ones', () => {
    expect(equals([0.1 + 0.2, 1e6, 0], [0.3, 1e6 + 1e-7, 1e-13])).toBe(true);
    expect(equals([1, 2, 3], [1, 2, 3.001])).toBe(false);
    expect(equals([1, 2, Number.NaN], [1, 2, Number.NaN])).toBe(false);
  });
});
