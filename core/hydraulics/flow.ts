import type { SegmentTree } from '../topology/node-tree.js';
import { KirchhoffSystem, treeEliminationOrder, treeNetwork } from './kirchhoff.js';

/**
 * Steady sap flow with embolism feedback. Water potential Ψ (MPa) plus the hydrostatic term
 * ρ g z gives the potential H that drives flow (H = Ψ + ρ g z); the base is held at the soil water
 * potential, each tip draws its share of the transpiration, and every segment's conductance is
 * reduced by the PLC at its mean water potential. The coupled problem is solved by fixed-point
 * iteration, each step a Kirchhoff solve: starting from full conductance, Ψ can only fall and PLC
 * only rise from step to step, so the iteration either converges to the least negative steady
 * state or runs away (no steady state: runaway embolism).
 */
export interface FlowSetup {
  tree: SegmentTree;
  /** Conductance without embolism, kg s⁻¹ MPa⁻¹, per segment. */
  maxConductance: Float64Array;
  /** Height of every node, m: node 0 the stem base, node i + 1 the end of segment i. */
  nodeZ: Float64Array;
  /** ρ g in MPa m⁻¹ (0 to ignore gravity). */
  gravityGradientMpaPerM: number;
  soilWaterPotentialMpa: number;
  /** Share of the transpiration drawn at each segment's end (0 except at tips), sums to 1. */
  tipShare: Float64Array;
  /** PLC (%) as a function of Ψ (MPa). */
  plc: (psiMpa: number) => number;
  toleranceMpa: number;
  maxIterations: number;
}

export interface FlowState {
  transpirationKgS: number;
  /**
   * `converged`: a steady state; `lost_conductance`: some segment passed RUNAWAY_PLC_PERCENT
   * (runaway embolism); `iteration_limit`: no convergence within the limit (treated as runaway too).
   */
  outcome: 'converged' | 'lost_conductance' | 'iteration_limit';
  /** True when there is no steady state (outcome is not `converged`). */
  runaway: boolean;
  iterations: number;
  /** Ψ at every node, MPa (node 0 base, node i + 1 end of segment i). */
  nodePsiMpa: Float64Array;
  plcPercent: Float64Array;
  conductance: Float64Array;
  /** Flow through each segment, kg s⁻¹, towards the tips. */
  flowKgS: Float64Array;
  minPsiMpa: number;
  /** Index of the segment whose end has the lowest Ψ. */
  minPsiSegment: number;
}

const systems = new WeakMap<FlowSetup, KirchhoffSystem>();

/** One prepared Kirchhoff system per setup: the base fixed, every other node free. */
function systemOf(setup: FlowSetup): KirchhoffSystem {
  let s = systems.get(setup);
  if (!s) {
    const mask = new Array<boolean>(setup.tree.size + 1).fill(false);
    mask[0] = true;
    s = new KirchhoffSystem(treeNetwork(setup.tree, setup.maxConductance), mask, treeEliminationOrder(setup.tree));
    systems.set(setup, s);
  }
  return s;
}

/** PLC at which a segment counts as lost: a steady state beyond it is treated as runaway. */
export const RUNAWAY_PLC_PERCENT = 99.9;

/**
 * Solve the steady state at one transpiration.
 * @param transpirationKgS total transpiration, kg s⁻¹
 * @param start node Ψ to start from (must lie at or above the answer, e.g. the state at a lower
 *   transpiration); default: full conductance
 */
export function steadyFlow(setup: FlowSetup, transpirationKgS: number, start?: Float64Array): FlowState {
  const { tree, maxConductance, nodeZ, gravityGradientMpaPerM: rg, plc } = setup;
  const n = tree.size;
  const system = systemOf(setup);
  const from = system.net.edgeFrom;
  const fixed = new Float64Array(n + 1).fill(Number.NaN);
  fixed[0] = setup.soilWaterPotentialMpa + rg * nodeZ[0];
  const injection = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) injection[i + 1] = -transpirationKgS * setup.tipShare[i];
  const plcPercent = new Float64Array(n);
  const conductance = new Float64Array(n);
  let psi = start ? Float64Array.from(start) : null;
  let iterations = 0;
  let flow: Float64Array = new Float64Array(n);
  let outcome: FlowState['outcome'] = 'iteration_limit';
  while (iterations < setup.maxIterations) {
    let lost = false;
    for (let i = 0; i < n; i++) {
      const p = psi ? plc(0.5 * (psi[from[i]] + psi[i + 1])) : 0;
      if (!(p <= RUNAWAY_PLC_PERCENT)) lost = true;
      conductance[i] = maxConductance[i] * (1 - p / 100);
    }
    if (lost) {
      outcome = 'lost_conductance';
      break;
    }
    const sol = system.solve(fixed, { conductance, injection });
    iterations++;
    const next = new Float64Array(n + 1);
    for (let v = 0; v <= n; v++) next[v] = sol.potential[v] - rg * nodeZ[v];
    flow = sol.edgeFlow;
    let change = Number.POSITIVE_INFINITY;
    if (psi) {
      change = 0;
      for (let v = 0; v <= n; v++) change = Math.max(change, Math.abs(next[v] - psi[v]));
    }
    psi = next;
    if (!(change >= 0)) {
      outcome = 'lost_conductance';
      break;
    }
    if (change <= setup.toleranceMpa) {
      outcome = 'converged';
      break;
    }
  }
  const nodePsi = psi ?? new Float64Array(n + 1).fill(Number.NaN);
  // PLC consistent with the final potentials.
  for (let i = 0; i < n; i++) plcPercent[i] = plc(0.5 * (nodePsi[from[i]] + nodePsi[i + 1]));
  let minPsi = Number.POSITIVE_INFINITY;
  let minSeg = -1;
  for (let i = 0; i < n; i++) {
    if (nodePsi[i + 1] < minPsi) {
      minPsi = nodePsi[i + 1];
      minSeg = i;
    }
  }
  return {
    transpirationKgS,
    outcome,
    runaway: outcome !== 'converged',
    iterations,
    nodePsiMpa: nodePsi,
    plcPercent,
    conductance: Float64Array.from(conductance),
    flowKgS: Float64Array.from(flow),
    minPsiMpa: minPsi,
    minPsiSegment: minSeg,
  };
}

export interface CriticalTranspiration {
  /** Largest transpiration with a converged steady state, kg s⁻¹ (a lower bound within rtol). */
  criticalKgS: number;
  /** Steady state at that transpiration. */
  state: FlowState;
  bisectionSteps: number;
}

/**
 * Critical transpiration: bisection between a transpiration with a steady state and one without.
 * Each trial starts from the last steady state found (which lies above the new answer), so the
 * fixed-point iteration stays monotone.
 * @param guessKgS a starting upper guess, kg s⁻¹ (> 0)
 * @param rtol stop when (high − low) ≤ rtol · high
 */
export function criticalTranspiration(setup: FlowSetup, guessKgS: number, rtol: number): CriticalTranspiration {
  let low = 0;
  let lowState = steadyFlow(setup, 0);
  if (lowState.runaway) return { criticalKgS: 0, state: lowState, bisectionSteps: 0 };
  let high = guessKgS > 0 ? guessKgS : 1e-6;
  let steps = 0;
  for (let k = 0; k < 200; k++) {
    const s = steadyFlow(setup, high, lowState.nodePsiMpa);
    steps++;
    if (s.runaway) break;
    low = high;
    lowState = s;
    high *= 2;
  }
  while (high - low > rtol * high) {
    const mid = 0.5 * (low + high);
    const s = steadyFlow(setup, mid, lowState.nodePsiMpa);
    steps++;
    if (s.runaway) high = mid;
    else {
      low = mid;
      lowState = s;
    }
  }
  return { criticalKgS: low, state: lowState, bisectionSteps: steps };
}
