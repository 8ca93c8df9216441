import type { IntegratorKind } from '../spec/runSpec';
import { FORCE_EVALUATIONS_PER_STEP } from '../spec/runSpec';
import type { ParticleState } from './state';

/**
 * Advances particles by one step of length dt (internal time units).
 * Invariant on entry and exit: p.ax/ay/az hold the accelerations at the
 * current positions, so every scheme can start with a kick and a run can be
 * resumed from the state alone. `evaluate` refreshes the accelerations from
 * the current positions.
 */
export interface Integrator {
  readonly kind: IntegratorKind;
  readonly evaluationsPerStep: number;
  step(p: ParticleState, dt: number, evaluate: () => void): void;
}

function kick(p: ParticleState, h: number): void {
  for (let i = 0; i < p.n; i++) {
    p.vx[i] += h * p.ax[i];
    p.vy[i] += h * p.ay[i];
    p.vz[i] += h * p.az[i];
  }
}

function drift(p: ParticleState, h: number): void {
  for (let i = 0; i < p.n; i++) {
    p.x[i] += h * p.vx[i];
    p.y[i] += h * p.vy[i];
    p.z[i] += h * p.vz[i];
  }
}

function kickDriftKick(p: ParticleState, h: number, evaluate: () => void): void {
  kick(p, 0.5 * h);
  drift(p, h);
  evaluate();
  kick(p, 0.5 * h);
}

// Yoshida (1990): three leapfrog sub-steps w1, w0, w1 with w1 = 1/(2 - 2^(1/3)),
// w0 = 1 - 2 w1, cancel the third-order error of the composition.
const CBRT2 = Math.cbrt(2);
const YOSHIDA_W1 = 1 / (2 - CBRT2);
const YOSHIDA_W0 = 1 - 2 * YOSHIDA_W1;

function rk4(n: number): Integrator {
  // Starting state and the weighted sums of the four stage slopes.
  const f = () => new Float64Array(n);
  const x0 = f(), y0 = f(), z0 = f(), vx0 = f(), vy0 = f(), vz0 = f();
  const sx = f(), sy = f(), sz = f(), svx = f(), svy = f(), svz = f();
  const WEIGHTS = [1, 2, 2, 1];
  const NEXT_STAGE_AT = [0.5, 0.5, 1];
  return {
    kind: 'rk4',
    evaluationsPerStep: FORCE_EVALUATIONS_PER_STEP.rk4,
    step(p, dt, evaluate) {
      x0.set(p.x); y0.set(p.y); z0.set(p.z);
      vx0.set(p.vx); vy0.set(p.vy); vz0.set(p.vz);
      for (let s = 0; s < 4; s++) {
        // p.v and p.a hold this stage's slopes of position and velocity.
        const w = WEIGHTS[s];
        const h = s < 3 ? NEXT_STAGE_AT[s] * dt : 0;
        for (let i = 0; i < n; i++) {
          const vx = p.vx[i], vy = p.vy[i], vz = p.vz[i];
          const ax = p.ax[i], ay = p.ay[i], az = p.az[i];
          if (s === 0) {
            sx[i] = vx; sy[i] = vy; sz[i] = vz; svx[i] = ax; svy[i] = ay; svz[i] = az;
          } else {
            sx[i] += w * vx; sy[i] += w * vy; sz[i] += w * vz; svx[i] += w * ax; svy[i] += w * ay; svz[i] += w * az;
          }
          if (s < 3) {
            p.x[i] = x0[i] + h * vx; p.y[i] = y0[i] + h * vy; p.z[i] = z0[i] + h * vz;
            p.vx[i] = vx0[i] + h * ax; p.vy[i] = vy0[i] + h * ay; p.vz[i] = vz0[i] + h * az;
          }
        }
        if (s < 3) evaluate();
      }
      const h6 = dt / 6;
      for (let i = 0; i < n; i++) {
        p.x[i] = x0[i] + h6 * sx[i]; p.y[i] = y0[i] + h6 * sy[i]; p.z[i] = z0[i] + h6 * sz[i];
        p.vx[i] = vx0[i] + h6 * svx[i]; p.vy[i] = vy0[i] + h6 * svy[i]; p.vz[i] = vz0[i] + h6 * svz[i];
      }
      evaluate(); // restores the invariant and is the next step's first stage
    },
  };
}

export function makeIntegrator(kind: IntegratorKind, n: number): Integrator {
  switch (kind) {
    case 'leapfrog':
      return { kind, evaluationsPerStep: FORCE_EVALUATIONS_PER_STEP.leapfrog, step: (p, dt, ev) => kickDriftKick(p, dt, ev) };
    case 'yoshida4':
      return {
        kind,
        evaluationsPerStep: FORCE_EVALUATIONS_PER_STEP.yoshida4,
        step(p, dt, ev) {
          kickDriftKick(p, YOSHIDA_W1 * dt, ev);
          kickDriftKick(p, YOSHIDA_W0 * dt, ev);
          kickDriftKick(p, YOSHIDA_W1 * dt, ev);
        },
      };
    case 'rk4':
      return rk4(n);
  }
}
