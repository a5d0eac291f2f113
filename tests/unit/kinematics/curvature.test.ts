import { describe, expect, it } from 'vitest';
import {
  contactPointVelocities, objectSurfaceCurvature, relativeCurvature, rollerSurfaceCurvature, sheetCurvature,
  type RollerGeometry, type SurfaceCurvature,
} from '../../../src/lib/kinematics/curvature';
import { createFinger } from '../../../src/lib/kinematics/hand';
import { fromAxisAngle, fromSheet, multiply, rotate, toSheet } from '../../../src/lib/kinematics/quat';
import { solveSheet } from '../../../src/lib/kinematics/scene';
import {
  boxShape, capsuleShape, closestSurfacePoint, cylinderShape, ellipsoidShape, sphereShape, support, type ConvexShape,
} from '../../../src/lib/kinematics/shapes';
import { cross, dot, normalize, perpendicular } from '../../../src/lib/kinematics/vec3';
import type { FingerInput, RollerInput, SheetDocument, Vec3Tuple } from '../../../src/lib/sheet/types';

/** Surface point and outward normal of a shape nearest to a point just outside it (shape frame). */
function surfacePoint(shape: ConvexShape, outside: Vec3Tuple) {
  const q = closestSurfacePoint(shape, outside);
  return { point: Array.from(q.point), normal: Array.from(q.normal) };
}

/** The shape operator as a 2 x 2 matrix in the tangent basis (t1, t2), from principal curvatures and directions. */
function operatorIn(curvature: SurfaceCurvature, t1: number[], t2: number[]): number[][] {
  const [k1, k2] = curvature.principalCurvatures!;
  const [d1, d2] = curvature.principalDirections!;
  const entry = (a: number[], b: number[]) => k1 * dot(d1, a) * dot(d1, b) + k2 * dot(d2, a) * dot(d2, b);
  return [[entry(t1, t1), entry(t1, t2)], [entry(t2, t1), entry(t2, t2)]];
}

/**
 * The independent numerical route: the surface near p is p + u t1 + v t2 - h(u, v) n, and the
 * Hessian of the height h at the origin is the shape operator in the basis (t1, t2) (do Carmo
 * 1976, sec. 3-3, the local canonical form). h is found from the signed distance alone
 * (fixed point h <- h + sd, which converges because sd moves by ~1 per unit along -n), and the
 * Hessian by central second differences.
 */
function heightHessian(signedDistance: (q: number[]) => number, p: number[], n: number[], t1: number[], t2: number[], step: number): number[][] {
  const height = (u: number, v: number) => {
    let h = 0;
    for (let i = 0; i < 8; i++) {
      const q = [0, 1, 2].map((k) => p[k] + u * t1[k] + v * t2[k] - h * n[k]);
      h += signedDistance(q);
    }
    return h;
  };
  const h0 = height(0, 0);
  const huu = (height(step, 0) - 2 * h0 + height(-step, 0)) / (step * step);
  const hvv = (height(0, step) - 2 * h0 + height(0, -step)) / (step * step);
  const huv = (height(step, step) - height(step, -step) - height(-step, step) + height(-step, -step)) / (4 * step * step);
  return [[huu, huv], [huv, hvv]];
}

function expectOrthonormalFrame(curvature: SurfaceCurvature, outwardNormal: number[]): void {
  const [d1, d2] = curvature.principalDirections!;
  expect([dot(d1, d1), dot(d2, d2), dot(d1, d2), dot(d1, outwardNormal)]).toBeNear([1, 1, 0, 0], { abs: 1e-12 });
  expect(cross(d1, d2)).toBeNear(outwardNormal, { abs: 1e-12 });
}

/** |cos| of the angle between two unit directions: 1 when they lie on one line. */
const alignment = (a: number[], b: number[]) => Math.abs(dot(a, b));

describe('principal curvatures of the object shapes against closed forms', () => {
  it('sphere: 1/r in every direction (do Carmo 1976, sec. 3-2, example 1)', () => {
    const r = 0.04;
    for (const outside of [[0.05, 0.01, -0.02], [0, 0, 1], [-1, 2, 0.5]] as Vec3Tuple[]) {
      const { point, normal } = surfacePoint(sphereShape(r), outside);
      const c = objectSurfaceCurvature(sphereShape(r), point, normal);
      expect(c.region).toBe('sphere');
      expect(c.principalCurvatures).toBeNear([1 / r, 1 / r], { rel: 1e-14 });
      expectOrthonormalFrame(c, normal);
    }
  });

  it('cylinder: 1/r around the axis and 0 along it on the side, flat caps, no curvature on the rim (do Carmo 1976, sec. 3-2)', () => {
    const shape = cylinderShape(0.02, 0.05);
    const side = surfacePoint(shape, [0.03, 0.01, 0.02]);
    const c = objectSurfaceCurvature(shape, side.point, side.normal);
    expect(c.region).toBe('side');
    expect(c.principalCurvatures).toBeNear([50, 0], { abs: 1e-12 });
    expect(alignment(c.principalDirections![1], [0, 0, 1])).toBeNear(1, { abs: 1e-12 });
    expect(c.principalDirections![0][2]).toBeNear(0, { abs: 1e-15 });
    expectOrthonormalFrame(c, side.normal);
    const cap = surfacePoint(shape, [0.005, -0.01, 0.07]);
    expect(objectSurfaceCurvature(shape, cap.point, cap.normal)).toMatchObject({ region: 'cap', principalCurvatures: [0, 0] });
    const rim = surfacePoint(shape, [0.03, 0, 0.06]);
    expect(objectSurfaceCurvature(shape, rim.point, rim.normal)).toEqual({ region: 'rim', principalCurvatures: null, principalDirections: null });
  });

  it('capsule: a cylinder on its side and a sphere on its hemispherical ends (common practice: the capsule is a swept ball)', () => {
    const shape = capsuleShape(0.015, 0.03);
    const side = surfacePoint(shape, [-0.01, 0.02, 0.01]);
    const c = objectSurfaceCurvature(shape, side.point, side.normal);
    expect(c).toMatchObject({ region: 'side' });
    expect(c.principalCurvatures).toBeNear([1 / 0.015, 0], { rel: 1e-14 });
    const end = surfacePoint(shape, [0.01, 0.01, -0.06]);
    const e = objectSurfaceCurvature(shape, end.point, end.normal);
    expect(e.region).toBe('hemisphere');
    expect(e.principalCurvatures).toBeNear([1 / 0.015, 1 / 0.015], { rel: 1e-14 });
  });

  it('box: flat faces, fillets curved 1/f across and 0 along the edge, corners 1/f both ways; a sharp edge has none', () => {
    const shape = boxShape([0.04, 0.03, 0.02], 0.005);
    const face = surfacePoint(shape, [0.01, 0.05, 0.003]);
    expect(objectSurfaceCurvature(shape, face.point, face.normal)).toMatchObject({ region: 'face', principalCurvatures: [0, 0] });
    const edge = surfacePoint(shape, [0.05, 0.04, 0.001]);
    const ce = objectSurfaceCurvature(shape, edge.point, edge.normal);
    expect(ce.region).toBe('rounded-edge');
    expect(ce.principalCurvatures).toBeNear([200, 0], { rel: 1e-12 });
    expect(alignment(ce.principalDirections![1], [0, 0, 1])).toBeNear(1, { abs: 1e-12 });
    expectOrthonormalFrame(ce, edge.normal);
    const corner = surfacePoint(shape, [0.05, -0.04, 0.03]);
    const cc = objectSurfaceCurvature(shape, corner.point, corner.normal);
    expect(cc.region).toBe('rounded-corner');
    expect(cc.principalCurvatures).toBeNear([200, 200], { rel: 1e-12 });
    const sharp = boxShape([0.04, 0.03, 0.02]);
    const onEdge = surfacePoint(sharp, [0.05, 0.04, 0.001]);
    expect(objectSurfaceCurvature(sharp, onEdge.point, onEdge.normal)).toEqual({ region: 'sharp-edge', principalCurvatures: null, principalDirections: null });
    const onFace = surfacePoint(sharp, [0.01, 0.01, 0.05]);
    expect(objectSurfaceCurvature(sharp, onFace.point, onFace.normal).principalCurvatures).toEqual([0, 0]);
  });

  it('ellipsoid: Gaussian and mean curvature at any point, and a/b^2, a/c^2 at the tip of the a axis (do Carmo 1976, sec. 3-3; formulas from memory)', () => {
    const [a, b, c] = [0.05, 0.035, 0.02];
    const shape = ellipsoidShape([a, b, c]);
    for (const direction of [[1, 0.3, -0.2], [-0.2, 1, 0.7], [0.1, -0.4, -1], [0.6, 0.6, 0.6]] as Vec3Tuple[]) {
      const p = support(shape, direction);
      const { point, normal } = surfacePoint(shape, [p[0] + 1e-3 * direction[0], p[1] + 1e-3 * direction[1], p[2] + 1e-3 * direction[2]]);
      const curvature = objectSurfaceCurvature(shape, point, normal);
      const [k1, k2] = curvature.principalCurvatures!;
      const [x, y, z] = point;
      const s = (x * x) / a ** 4 + (y * y) / b ** 4 + (z * z) / c ** 4;
      const gaussian = 1 / (a * a * b * b * c * c * s * s);
      const mean = (a * a + b * b + c * c - x * x - y * y - z * z) / (2 * a * a * b * b * c * c * s ** 1.5);
      expect(k1 * k2).toBeNear(gaussian, { rel: 1e-10 });
      expect((k1 + k2) / 2).toBeNear(mean, { rel: 1e-10 });
      expectOrthonormalFrame(curvature, normal);
    }
    const tip = objectSurfaceCurvature(shape, [a, 0, 0], [1, 0, 0]);
    // Largest first: a/c^2 along z, then a/b^2 along y.
    expect(tip.principalCurvatures).toBeNear([a / (c * c), a / (b * b)], { rel: 1e-14 });
    expect(alignment(tip.principalDirections![0], [0, 0, 1])).toBeNear(1, { abs: 1e-14 });
    expect(alignment(tip.principalDirections![1], [0, 1, 0])).toBeNear(1, { abs: 1e-14 });
  });
});

describe('principal curvatures against the Hessian of the height function (independent numerical route)', () => {
  const cases: { name: string; shape: ConvexShape; outside: Vec3Tuple[] }[] = [
    { name: 'sphere', shape: sphereShape(0.03), outside: [[0.04, 0.01, 0.02], [-0.01, -0.05, 0.01]] },
    { name: 'ellipsoid', shape: ellipsoidShape([0.05, 0.035, 0.02]), outside: [[0.04, 0.03, 0.01], [-0.02, 0.01, 0.03], [0.06, 0, 0.001]] },
    { name: 'cylinder side and cap', shape: cylinderShape(0.02, 0.05), outside: [[0.03, 0.02, -0.01], [0.004, 0.006, 0.08]] },
    { name: 'capsule side and end', shape: capsuleShape(0.015, 0.03), outside: [[0.02, -0.01, 0.005], [0.01, 0.012, 0.06]] },
    { name: 'box face, rounded edge and corner', shape: boxShape([0.04, 0.03, 0.02], 0.005), outside: [[0.01, 0.05, 0.003], [0.05, 0.04, 0.001], [0.05, -0.04, 0.03]] },
  ];
  it.each(cases)('$name', ({ shape, outside }) => {
    for (const o of outside) {
      const { point, normal } = surfacePoint(shape, o);
      const curvature = objectSurfaceCurvature(shape, point, normal);
      const t1 = perpendicular(normal), t2 = cross(normal, t1);
      const numeric = heightHessian((q) => closestSurfacePoint(shape, q).signedDistance, point, normal, t1, t2, 2e-6);
      expect(operatorIn(curvature, t1, t2)).toBeNear(numeric, { abs: 2e-3, rel: 1e-4 });
    }
  });

  it('rollers: a ball and the side and end face of a tilted cylindrical roller', () => {
    const center: Vec3Tuple = [0.01, -0.02, 0.03];
    const axis = normalize([0.3, -0.5, 0.8]);
    const e1 = perpendicular(axis), e2 = cross(axis, e1);
    const local = cylinderShape(0.012, 0.008);
    // The roller in a frame with its axis as z, to reuse the shape's signed distance.
    const toLocal = (q: number[]) => { const d = [q[0] - center[0], q[1] - center[1], q[2] - center[2]]; return [dot(d, e1), dot(d, e2), dot(d, axis)]; };
    const toWorld = (l: number[]) => [0, 1, 2].map((k) => center[k] + l[0] * e1[k] + l[1] * e2[k] + l[2] * axis[k]);
    const wheel: RollerGeometry = { kind: 'cylinder', radius: 0.012, halfWidth: 0.008, center, axis };
    for (const outsideLocal of [[0.02, 0.01, 0.002], [0.003, -0.004, 0.02]]) {
      const q = closestSurfacePoint(local, outsideLocal);
      const point = toWorld(Array.from(q.point));
      const normal = toWorld(Array.from(q.normal)).map((x, k) => x - center[k]);
      const curvature = rollerSurfaceCurvature(wheel, point, normal);
      expect(['side', 'cap']).toContain(curvature.region);
      const t1 = perpendicular(normal), t2 = cross(normal, t1);
      const numeric = heightHessian((p) => closestSurfacePoint(local, toLocal(p)).signedDistance, point, normal, t1, t2, 2e-6);
      expect(operatorIn(curvature, t1, t2)).toBeNear(numeric, { abs: 2e-3, rel: 1e-4 });
    }
    const ball: RollerGeometry = { kind: 'sphere', radius: 0.01, halfWidth: 0, center, axis };
    const normal = normalize([1, 2, -2]);
    const point = center.map((c, k) => c + 0.01 * normal[k]);
    const numeric = heightHessian((p) => Math.hypot(p[0] - center[0], p[1] - center[1], p[2] - center[2]) - 0.01, point, normal, perpendicular(normal), cross(normal, perpendicular(normal)), 2e-6);
    const curvature = rollerSurfaceCurvature(ball, point, normal);
    expect(operatorIn(curvature, perpendicular(normal), cross(normal, perpendicular(normal)))).toBeNear(numeric, { abs: 2e-3, rel: 1e-4 });
  });
});

describe('relative curvature K_rel = K_o + R_psi K_f R_psi', () => {
  const n = [0, 0, 1];
  /** A cylinder-like surface of radius r whose axis makes the angle t with x, as seen from the side with outward normal m. */
  const cylinderLike = (r: number, t: number, m: number[]): SurfaceCurvature => {
    const along: Vec3Tuple = [Math.cos(t), Math.sin(t), 0];
    const around = cross(along, m) as Vec3Tuple;
    return { region: 'side', principalCurvatures: [1 / r, 0], principalDirections: [around, along] };
  };

  it('two crossed cylinders: the sum and difference of the principal relative curvatures follow Hertz (Johnson 1985, "Contact Mechanics", sec. 4.1; from memory)', () => {
    const [r1, r2] = [0.02, 0.012];
    for (const crossing of [0, 0.3, Math.PI / 4, 1.2, Math.PI / 2]) {
      const relative = relativeCurvature(cylinderLike(r1, 0, n), cylinderLike(r2, crossing, [0, 0, -1]), n);
      const [k1, k2] = relative.principalCurvatures!;
      // h = A x^2 + B y^2 with A + B = (1/2)(sum of curvatures), |B - A| = (1/2) sqrt(1/r1^2 + 1/r2^2 + 2 cos(2 crossing) / (r1 r2)).
      expect(k1 + k2).toBeNear(1 / r1 + 1 / r2, { rel: 1e-12 });
      expect(k1 - k2).toBeNear(Math.sqrt(1 / r1 ** 2 + 1 / r2 ** 2 + (2 * Math.cos(2 * crossing)) / (r1 * r2)), { rel: 1e-9, abs: 1e-9 });
      expect(relative.status).toBe(crossing === 0 ? 'singular' : 'defined');
    }
  });

  it('two balls: 1/r + 1/rho in every direction (Johnson 1985, sec. 4.1, the equivalent radius 1/R = 1/R1 + 1/R2)', () => {
    const object = objectSurfaceCurvature(sphereShape(0.04), [0, 0, 0.04], n);
    const roller = rollerSurfaceCurvature({ kind: 'sphere', radius: 0.01, halfWidth: 0, center: [0, 0, 0.05], axis: [0, 0, 1] }, [0, 0, 0.04], [0, 0, -1]);
    const relative = relativeCurvature(object, roller, n);
    expect(relative.principalCurvatures).toBeNear([125, 125], { rel: 1e-13 });
    expect(relative.matrix).toBeNear([[125, 0], [0, 125]], { rel: 1e-13, abs: 1e-12 });
  });

  it('is undefined against a sharp edge and singular for a line contact, and then gives no contact velocity', () => {
    const sharp: SurfaceCurvature = { region: 'sharp-edge', principalCurvatures: null, principalDirections: null };
    const ball = umbilicBall(0.01);
    expect(relativeCurvature(sharp, ball, n).status).toBe('undefined');
    const flat: SurfaceCurvature = { region: 'face', principalCurvatures: [0, 0], principalDirections: [[1, 0, 0], [0, 1, 0]] };
    const wheel = cylinderLike(0.01, 0.4, [0, 0, -1]);
    const line = relativeCurvature(flat, wheel, n);
    expect(line.status).toBe('singular');
    const wander = contactPointVelocities(flat, wheel, line, n, [1, 0, 0], [0, 0, 0], true);
    expect(wander).toMatchObject({ status: 'singular', rollerVelocity: null, rollerSpeed: null, objectVelocity: null, objectSpeed: null });
  });
});

function umbilicBall(radius: number): SurfaceCurvature {
  return { region: 'sphere', principalCurvatures: [1 / radius, 1 / radius], principalDirections: [[1, 0, 0], [0, -1, 0]] };
}

describe('contact-point velocities (Montana 1988)', () => {
  it('a ball rolling on a flat face: the contact point moves rho |w| over both, along n x w (common practice: rolling without slipping)', () => {
    const n = [0, 0, 1];
    const flat: SurfaceCurvature = { region: 'face', principalCurvatures: [0, 0], principalDirections: [[1, 0, 0], [0, 1, 0]] };
    const ball = umbilicBall(0.01);
    const wander = contactPointVelocities(flat, ball, relativeCurvature(flat, ball, n), n, [0, 2, 0], [0, 0, 0], true);
    // n x w = (0, 0, 1) x (0, 2, 0) = (-2, 0, 0); times rho = 0.01 m.
    expect(wander.rollerVelocity).toBeNear([-0.02, 0, 0], { abs: 1e-15 });
    expect(wander.objectVelocity).toBeNear([-0.02, 0, 0], { abs: 1e-15 });
    expect(wander.rollerSpeed).toBeNear(0.02, { rel: 1e-14 });
  });

  it('reports no velocity when the roller does not touch the object', () => {
    const n = [0, 0, 1];
    const ball = umbilicBall(0.01), object = umbilicBall(0.04);
    const wander = contactPointVelocities(object, ball, relativeCurvature(object, ball, n), n, [0, 2, 0], [0, 0, 0], false);
    expect(wander).toMatchObject({ status: 'not-touching', rollerVelocity: null, relativeAngularVelocity: [0, 2, 0] });
  });
});

/** A finger of three revolute joints in general position (invented numbers) carrying the given roller. */
function genericFinger(roller: RollerInput, center: number[]): FingerInput {
  const at = (dx: number, dy: number, dz: number): Vec3Tuple => [center[0] + dx, center[1] + dy, center[2] + dz];
  return {
    name: 'probe',
    joints: [
      { name: 'j1', role: 'other', axis: normalize([0.2, 1, 0.1]) as Vec3Tuple, point: at(0.06, -0.01, -0.08), angle: 0 },
      { name: 'j2', role: 'other', axis: normalize([1, -0.3, 0.2]) as Vec3Tuple, point: at(-0.02, 0.05, -0.04), angle: 0 },
      { name: 'j3', role: 'other', axis: normalize([0.1, 0.2, 1]) as Vec3Tuple, point: at(0.03, 0.04, 0.01), angle: 0 },
    ],
    roller,
  };
}

/** An ellipsoid held at an invented pose, one roller touching it where the outward normal (object frame) points along `direction`. */
function rollingSheet(rollerKind: 'sphere' | 'cylinder', direction: Vec3Tuple): SheetDocument {
  const semiAxes: Vec3Tuple = [0.05, 0.035, 0.025];
  const orientation = fromAxisAngle(normalize([1, 2, 3]), 0.7);
  const position: Vec3Tuple = [0.01, -0.02, 0.15];
  const local = support(ellipsoidShape(semiAxes), direction);
  const x = rotate(orientation, local).map((v, k) => v + position[k]);
  const n = rotate(orientation, normalize(direction));
  const rho = 0.012;
  const center = x.map((v, k) => v + rho * n[k]) as Vec3Tuple;
  const roller: RollerInput = rollerKind === 'sphere'
    ? { kind: 'sphere', radius: rho, center }
    : { kind: 'cylinder', radius: rho, halfWidth: 0.006, center, axis: normalize(cross(n, [0.3, -0.2, 0.9])) as Vec3Tuple };
  // The object turns about a tangent axis at the contact while its origin drifts.
  const tangent = normalize(cross(n, [0.5, 1, -0.2]));
  return {
    format: 'slipless.sheet',
    version: 1,
    title: 'rolling probe',
    description: '',
    tags: [],
    object: {
      shape: { kind: 'ellipsoid', semiAxes },
      pose: { position, orientation: toSheet(orientation) },
      twist: { linear: [0.004, -0.002, 0.003], angular: tangent.map((t) => 0.8 * t) as Vec3Tuple },
    },
    hand: { name: 'probe hand', fingers: [genericFinger(roller, center)] },
    motion: {
      target: { position, orientation: toSheet(orientation) },
      run: { gain: 2, dt: 0.01, maxTicks: 10, positionTolerance: 1e-4, angleTolerance: 1e-3, stopOnSingular: false },
    },
    solver: { damping: 1e-7, singularRatio: 1e-3, axisDistance: 1e-3, minTangentialSpeed: 1e-5, contactTolerance: 2e-4, softFinger: false },
  };
}

/** The sheet moved on by time t along its twist and the full solution's joint rates. */
function advanced(doc: SheetDocument, rates: ArrayLike<number>, t: number): SheetDocument {
  const { position, orientation } = doc.object.pose;
  const { linear, angular } = doc.object.twist;
  const speed = Math.hypot(...angular);
  const turn = fromAxisAngle(angular.map((w) => w / speed), speed * t);
  const turned = multiply(turn, fromSheet(orientation));
  return {
    ...doc,
    object: { ...doc.object, pose: { position: position.map((p, k) => p + linear[k] * t) as Vec3Tuple, orientation: toSheet(turned) } },
    hand: { ...doc.hand, fingers: doc.hand.fingers.map((f) => ({ ...f, joints: f.joints.map((j, k) => ({ ...j, angle: j.angle + rates[k] * t })) })) },
  };
}

describe('contact-point velocities against finite differences of the solved contact (independent route)', () => {
  it.each([
    ['ball roller', 'sphere', [0.4, 0.7, 0.5]],
    ['cylindrical roller on its side', 'cylinder', [-0.6, 0.3, 0.8]],
  ] as const)('%s on an ellipsoid turning about a tangent axis: the contact point moves over roller and object as predicted', (_, kind, direction) => {
    const doc = rollingSheet(kind, [...direction]);
    const result = solveSheet(doc);
    const finger = result.fingers[0];
    expect(finger.contact.state).toBe('touching');
    const [curvature] = sheetCurvature(doc, result);
    expect(curvature.object.region).toBe('ellipsoid');
    expect(curvature.roller.region).toBe(kind === 'sphere' ? 'sphere' : 'side');
    expect(curvature.wander.status).toBe('defined');
    // The joints move the roller with the object: the slip left is small beside the contact-point speed.
    expect(finger.full.residualNorm).toBeLessThan(1e-6 * curvature.wander.rollerSpeed!);

    const step = 1e-5;
    const ahead = solveSheet(advanced(doc, finger.full.rates, step)).fingers[0].contact;
    const behind = solveSheet(advanced(doc, finger.full.rates, -step)).fingers[0].contact;
    const rate = (a: ArrayLike<number>, b: ArrayLike<number>) => [0, 1, 2].map((k) => (a[k] - b[k]) / (2 * step));
    // Local rates turned into the palm frame: the roller frame by the last link's rotation, the object frame by the object's.
    const linkRotation = createFinger(doc.hand.fingers[0]).rollerRotation;
    const overRoller = rate(ahead.rollerPointLocal, behind.rollerPointLocal);
    const overRollerPalm = [0, 1, 2].map((i) => linkRotation[3 * i] * overRoller[0] + linkRotation[3 * i + 1] * overRoller[1] + linkRotation[3 * i + 2] * overRoller[2]);
    const overObjectPalm = rotate(fromSheet(doc.object.pose.orientation), rate(ahead.objectPointLocal, behind.objectPointLocal));
    expect(overRollerPalm).toBeNear(curvature.wander.rollerVelocity!, { abs: 1e-6 * curvature.wander.rollerSpeed!, rel: 1e-5 });
    expect(overObjectPalm).toBeNear(curvature.wander.objectVelocity!, { abs: 1e-6 * curvature.wander.objectSpeed!, rel: 1e-5 });
  });

  it('with the roller slipping tangentially, the slip moves the contact point over each surface by the other surface\'s curvature', () => {
    const doc = rollingSheet('cylinder', [-0.6, 0.3, 0.8]);
    const result = solveSheet(doc);
    const finger = result.fingers[0];
    const n = Array.from(finger.contact.normal);
    // Joint rates changed by delta with J delta = s, s tangential: the normal speed is still met, s is left as slip.
    const s = cross(n, [0.2, -0.1, 0.4]).map((v) => 0.01 * v);
    const j = finger.full.jacobian.data, cols = finger.full.jacobian.cols;
    const column = (k: number) => [j[k], j[cols + k], j[2 * cols + k]];
    const det3 = (a: number[], b: number[], c: number[]) => dot(a, cross(b, c));
    const [c1, c2, c3] = [column(0), column(1), column(2)];
    const det = det3(c1, c2, c3);
    const delta = [det3(s, c2, c3) / det, det3(c1, s, c3) / det, det3(c1, c2, s) / det];
    finger.full.rates.set(Array.from(finger.full.rates, (r, k) => r + delta[k]));
    finger.full.residual.set([0, 1, 2].map((k) => finger.full.residual[k] - s[k]));
    const [curvature] = sheetCurvature(doc, result);
    expect(curvature.wander.tangentialSlip).toBeNear(s.map((v) => -v), { abs: 1e-6 * Math.hypot(...s) });

    const step = 1e-5;
    const ahead = solveSheet(advanced(doc, finger.full.rates, step)).fingers[0].contact;
    const behind = solveSheet(advanced(doc, finger.full.rates, -step)).fingers[0].contact;
    const rate = (a: ArrayLike<number>, b: ArrayLike<number>) => [0, 1, 2].map((k) => (a[k] - b[k]) / (2 * step));
    const linkRotation = createFinger(doc.hand.fingers[0]).rollerRotation;
    const overRoller = rate(ahead.rollerPointLocal, behind.rollerPointLocal);
    const overRollerPalm = [0, 1, 2].map((i) => linkRotation[3 * i] * overRoller[0] + linkRotation[3 * i + 1] * overRoller[1] + linkRotation[3 * i + 2] * overRoller[2]);
    const overObjectPalm = rotate(fromSheet(doc.object.pose.orientation), rate(ahead.objectPointLocal, behind.objectPointLocal));
    expect(overRollerPalm).toBeNear(curvature.wander.rollerVelocity!, { abs: 1e-6 * curvature.wander.rollerSpeed!, rel: 1e-5 });
    expect(overObjectPalm).toBeNear(curvature.wander.objectVelocity!, { abs: 1e-6 * curvature.wander.objectSpeed!, rel: 1e-5 });
    // Over the object and over the roller the contact point now moves differently, by the slip: a_f - a_o = v_t.
    expect(overRollerPalm.map((v, k) => v - overObjectPalm[k])).toBeNear(curvature.wander.tangentialSlip, { abs: 1e-5 * curvature.wander.rollerSpeed! });
  });
});

describe('sheetCurvature', () => {
  it('takes a finger\'s known curvature as it is and computes the others', () => {
    const doc = rollingSheet('sphere', [0.4, 0.7, 0.5]);
    const result = solveSheet(doc);
    const [computed] = sheetCurvature(doc, result);
    const [known] = sheetCurvature(doc, result, [computed]);
    expect(known).toBe(computed);
    expect(sheetCurvature(doc, result, [undefined])).toStrictEqual([computed]);
  });
});
