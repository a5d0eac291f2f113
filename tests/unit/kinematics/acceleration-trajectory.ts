import { quat as glQuat } from 'gl-matrix';

type V3 = [number, number, number];

/**
 * Orientation at time t of a body whose angular velocity (world frame) is omega + alpha s for s in
 * [0, t], from q0 ([x, y, z, w]): the quaternion equation q_dot = 1/2 [omega, 0] q integrated by
 * classical Runge-Kutta (common practice) with gl-matrix's quaternion product, independent of the core's quat.
 */
export function integrateOrientation(q0: readonly number[], omega: V3, alpha: V3, t: number, steps = 400): number[] {
  const q = [q0[0], q0[1], q0[2], q0[3]];
  const dt = t / steps;
  const rate = (s: number, at: number[]) => {
    const w = [omega[0] + alpha[0] * s, omega[1] + alpha[1] * s, omega[2] + alpha[2] * s, 0];
    const out = [0, 0, 0, 0];
    glQuat.multiply(out as unknown as glQuat, w as unknown as glQuat, at as unknown as glQuat);
    return out.map((x) => x / 2);
  };
  for (let i = 0; i < steps; i++) {
    const s = i * dt;
    const k1 = rate(s, q);
    const k2 = rate(s + dt / 2, q.map((x, c) => x + (dt / 2) * k1[c]));
    const k3 = rate(s + dt / 2, q.map((x, c) => x + (dt / 2) * k2[c]));
    const k4 = rate(s + dt, q.map((x, c) => x + dt * k3[c]));
    for (let c = 0; c < 4; c++) q[c] += (dt / 6) * (k1[c] + 2 * k2[c] + 2 * k3[c] + k4[c]);
  }
  const norm = Math.hypot(...q);
  return q.map((x) => x / norm);
}

