/**
 * Physical tracks: conditions that change with time (docs/cloud-structure.md
 * section 3). A track starts from the grid point's conditions (so the grid's
 * density axis is the start density n_0, its temperatures the start
 * temperatures) and the model's age is the time since the track started.
 *
 * - Free-fall collapse of a uniform, pressure-free sphere slowed by a
 *   retardation factor B <= 1:
 *     dn_H/dt = B (n_H^4/n_0)^(1/3) [24 pi G rho_0 ((n_H/n_0)^(1/3) - 1)]^(1/2),
 *   rho_0 = mu m_H n_0 with mu = 1.4 the mass per H nucleus (docs/physics.md
 *   section 2). The form is the physics primer's (Spitzer 1978, as used by
 *   Rawlings et al. 1992, MNRAS 255, 471; the paper was not at hand to
 *   re-check: memory); it is the first integral of the equation of motion
 *   r'' = -B^2 G M / r^2 of a shell starting at rest, derived again here:
 *   (1/2) r'^2 = B^2 G M (1/r - 1/r_0), n ~ r^-3. At n = n_0 the right-hand
 *   side is zero (the sphere starts at rest), so the density is taken from
 *   that equation's exact solution instead of integrating the equation
 *   above: r = r_0 cos^2(theta), B t = (theta + sin(theta) cos(theta)) / sqrt(8 pi G rho_0 / 3),
 *   n_H = n_0 cos^-6(theta) (the cycloid of pressure-free collapse). The
 *   collapse stops at the final density, which holds after.
 *   A_V grows as (n_H/n_0)^(2/3) when `av_growth` (the column of a
 *   contracting sphere, N ~ n r ~ n^(2/3): common practice).
 * - Warm-up: gas and dust temperatures each rise from their start value to
 *   the final temperature over `duration_yr`, as T_0 + (T_1 - T_0) (t / t_h)^p,
 *   p = 1 a linear ramp, p = 2 the t^2 heating of Garrod & Herbst (2006,
 *   A&A 457, 927; memory: not re-checked), and stay at T_1 after.
 */
import { GRAVITATIONAL_CONSTANT, HYDROGEN_MASS, MEAN_MASS_PER_H } from '../chem/constants.ts';
import type { PhysicalConditions } from '../config/conditions.ts';

export type PhysicalTrack =
  | { kind: 'free-fall'; finalDensity: number; retardation: number; avGrowth: boolean }
  | { kind: 'warm-up'; finalTemperature: number; durationYr: number; exponent: number };

/** Newton iterations of the cycloid's inversion; it converges to round-off in fewer than ten from the start chosen. */
const CYCLOID_MAX_ITERATIONS = 60;
const CYCLOID_TOLERANCE = 1e-14;

/** sqrt(8 pi G rho_0 / 3), s^-1: the rate of the free-fall cycloid for start density n0 (n_H, cm^-3). */
export function freeFallRate(n0: number): number {
  return Math.sqrt((8 * Math.PI * GRAVITATIONAL_CONSTANT * MEAN_MASS_PER_H * HYDROGEN_MASS * n0) / 3);
}

/** The free-fall time of the unretarded sphere, (pi/2) / freeFallRate = sqrt(3 pi / (32 G rho_0)), s. */
export function freeFallTime(n0: number): number {
  return Math.PI / 2 / freeFallRate(n0);
}

/** The cycloid's angle theta at scaled time tau = B t freeFallRate (0 <= tau < pi/2). */
function cycloidAngle(tau: number): number {
  // tau = theta + sin(theta) cos(theta) = theta + sin(2 theta)/2, increasing on [0, pi/2).
  let theta = Math.min(tau / 2, Math.PI / 2);
  if (tau > 1) theta = Math.PI / 2 - Math.cbrt((3 * (Math.PI / 2 - tau)) / 4);
  for (let i = 0; i < CYCLOID_MAX_ITERATIONS; i++) {
    const f = theta + Math.sin(theta) * Math.cos(theta) - tau;
    const df = 2 * Math.cos(theta) ** 2;
    if (df <= 0) break;
    const next = Math.min(Math.max(theta - f / df, 0), Math.PI / 2);
    if (Math.abs(next - theta) <= CYCLOID_TOLERANCE) return next;
    theta = next;
  }
  return theta;
}

/** n_H of the retarded free-fall collapse at time t (s) from n0 at rest, capped at finalDensity. */
export function freeFallDensity(n0: number, finalDensity: number, retardation: number, tSeconds: number): number {
  if (tSeconds <= 0) return n0;
  const thetaFinal = Math.acos((n0 / finalDensity) ** (1 / 6));
  const tau = retardation * tSeconds * freeFallRate(n0);
  if (tau >= thetaFinal + Math.sin(thetaFinal) * Math.cos(thetaFinal)) return finalDensity;
  return Math.min(n0 / Math.cos(cycloidAngle(tau)) ** 6, finalDensity);
}

/** The time the collapse takes to reach finalDensity, s. */
export function collapseDuration(n0: number, finalDensity: number, retardation: number): number {
  const theta = Math.acos((n0 / finalDensity) ** (1 / 6));
  return (theta + Math.sin(theta) * Math.cos(theta)) / (retardation * freeFallRate(n0));
}

/** The conditions of the track at time t (s) after its start, written into `out`. */
export function conditionsAt(track: PhysicalTrack, start: PhysicalConditions, tSeconds: number, yearSeconds: number, out: PhysicalConditions): PhysicalConditions {
  Object.assign(out, start);
  if (track.kind === 'free-fall') {
    const n = freeFallDensity(start.density, track.finalDensity, track.retardation, tSeconds);
    out.density = n;
    if (track.avGrowth) out.visual_extinction = start.visual_extinction * (n / start.density) ** (2 / 3);
    return out;
  }
  const f = Math.min(Math.max(tSeconds / (track.durationYr * yearSeconds), 0), 1) ** track.exponent;
  out.gas_temperature = start.gas_temperature + (track.finalTemperature - start.gas_temperature) * f;
  out.dust_temperature = start.dust_temperature + (track.finalTemperature - start.dust_temperature) * f;
  return out;
}
