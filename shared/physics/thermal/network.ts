/**
 * The thermal path of one switching device, junction to ambient, as a linear RC network advanced
 * exactly for piecewise-constant power.
 *
 * Topology (temperatures are rises above ambient, K):
 *
 *   junction ─ C₁ ─ R₁ ─ C₂ ─ … ─ Cₙ ─ Rₙ ─ case ─ R_cs ─ sink ─ R_sa ─ ambient
 *                                                         └ C_sink
 *
 * The junction–case part is the Cauer ladder synthesised from the datasheet Foster set
 * (./cauer.ts); the case node has no heat capacity of its own (it is the ladder's end). The sink
 * node carries the sink's heat capacity; with C_sink = 0 (or R_sa = 0) it is not a state and
 * Rₙ + R_cs + R_sa act as one series resistance to ambient.
 *
 * State equation C·dθ/dt = −G·θ + e₁·P with C diagonal and G symmetric (nodal analysis). With
 * y = C^(1/2)θ and M = C^(−1/2)·G·C^(−1/2) = V·diag(λ)·Vᵀ (Jacobi, ../../math/linalg.ts), the modal
 * coordinates x = Vᵀy decouple: dxₖ/dt = −λₖxₖ + bₖP, bₖ = V₁ₖ/√C₁, and the junction rise is
 * θ_j = Σ bₖxₖ. For P constant over Δt the update is exact (zero-order hold, e.g. Franklin,
 * Powell & Workman, *Digital Control of Dynamic Systems*, 3rd ed., ch. 4 [recalled]):
 *   xₖ ← xₖ·e^(−λₖΔt) + (bₖ/λₖ)(1 − e^(−λₖΔt))·P.
 * The network's junction-to-ambient response is itself a Foster sum with Rₖ = bₖ²/λₖ, τₖ = 1/λₖ.
 *
 * Assumption: each device has its own sink as its profile describes; several identical devices
 * of one role do not share (heat) a common sink in this model.
 */
import { symmetricEigen } from '../../math/linalg.ts';
import { fosterToCauer, type CauerStage } from './cauer.ts';
import type { FosterStage } from './foster.ts';

/** A device's thermal path as a driver profile gives it (per switch). */
export interface ThermalPath {
  /** Junction–case Foster set from the datasheet (K/W, s); at least one stage. */
  foster: readonly FosterStage[];
  /** Case–sink interface resistance, K/W (≥ 0). */
  caseToSinkKPerW: number;
  /** Sink–ambient resistance, K/W (≥ 0; 0 = sink held at ambient). */
  sinkToAmbientKPerW: number;
  /** Sink heat capacity, J/K (≥ 0; 0 = a sink without thermal mass: a plain resistance). */
  sinkHeatCapacityJPerK: number;
}

/**
 * Coefficients of the exact update over one interval Δt, per mode k:
 * decay = e^(−λΔt), gain = (b/λ)(1 − e^(−λΔt)); plus those of the junction rise averaged over the
 * interval: θ̄_j = Σ meanFromStateₖ·xₖ + meanRisePerW·P, with meanFromStateₖ = bₖ(1 − e^(−λΔt))/(λΔt)
 * and meanRisePerW = Σ (bₖ²/λₖ)(1 − (1 − e^(−λₖΔt))/(λₖΔt)).
 */
export interface StepCoefficients {
  dtS: number;
  decay: Float64Array;
  gain: Float64Array;
  meanFromState: Float64Array;
  /** K/W: the step-averaged junction rise per watt held over the step, from rest. */
  meanRisePerW: number;
  /** K/W: the end-of-step junction rise per watt held over the step, from rest: Zth(Δt). */
  endRisePerW: number;
}

/** 1 − (1 − e^(−z))/z without cancellation for small z (series below 1e-3). */
function oneMinusPhi1(z: number): number {
  if (z < 1e-3) return z / 2 - (z * z) / 6 + (z * z * z) / 24 - (z * z * z * z) / 120;
  return 1 + Math.expm1(-z) / z;
}

/**
 * A device's junction-to-ambient thermal network, precomputed once (Cauer synthesis and modal
 * decomposition); the state is a Float64Array of modal coordinates that the methods read and
 * update. Cheap per step: O(modes) with precomputed {@link StepCoefficients}.
 *
 * @example
 * const net = ThermalNetwork.fromPath({ foster: [{ rKPerW: 2, tauS: 0.01 }], caseToSinkKPerW: 0,
 *   sinkToAmbientKPerW: 0, sinkHeatCapacityJPerK: 0 });
 * const x = net.createState(); net.step(x, 50, 0.01); net.junctionRiseK(x) // → 63.2121 K
 */
export class ThermalNetwork {
  /** Junction–case Cauer ladder (junction first). */
  readonly cauer: readonly CauerStage[];
  readonly caseToSinkKPerW: number;
  readonly sinkToAmbientKPerW: number;
  readonly sinkHeatCapacityJPerK: number;
  /** True when the sink is a state node (C_sink > 0 and R_sa > 0). */
  readonly hasSinkNode: boolean;
  /** Number of state nodes = number of modes (Cauer nodes + the sink node if any). */
  readonly nodeCount: number;
  /** Modal decay rates λₖ in 1/s, ascending. */
  readonly ratesPerS: Float64Array;
  /** Modal input and junction-output weights bₖ = V₁ₖ/√C₁ (θ_j = Σ bₖxₖ; dxₖ/dt = −λₖxₖ + bₖP). */
  readonly junctionWeights: Float64Array;
  /** θ_case = Σ caseWeightsₖ·xₖ. */
  readonly caseWeights: Float64Array;
  /** θ_sink = Σ sinkWeightsₖ·xₖ. */
  readonly sinkWeights: Float64Array;
  /** Junction-to-ambient resistance ΣR_cauer + R_cs + R_sa in K/W. */
  readonly totalRKPerW: number;
  /** Row-major nodeCount×modes: θᵢ = Σₖ nodeFromModal[i·m+k]·xₖ. */
  private readonly nodeFromModal: Float64Array;
  /** Row-major modes×nodeCount: xₖ = Σᵢ modalFromNode[k·n+i]·θᵢ. */
  private readonly modalFromNode: Float64Array;

  private constructor(cauer: readonly CauerStage[], path: Omit<ThermalPath, 'foster'>) {
    this.cauer = cauer;
    this.caseToSinkKPerW = path.caseToSinkKPerW;
    this.sinkToAmbientKPerW = path.sinkToAmbientKPerW;
    this.sinkHeatCapacityJPerK = path.sinkHeatCapacityJPerK;
    const nc = cauer.length;
    const rLast = cauer[nc - 1].rKPerW;
    const rcs = path.caseToSinkKPerW;
    const rsa = path.sinkToAmbientKPerW;
    this.hasSinkNode = path.sinkHeatCapacityJPerK > 0 && rsa > 0;
    const n = nc + (this.hasSinkNode ? 1 : 0);
    this.nodeCount = n;
    const cap = new Float64Array(n);
    for (let i = 0; i < nc; i++) cap[i] = cauer[i].cJPerK;
    if (this.hasSinkNode) cap[nc] = path.sinkHeatCapacityJPerK;
    // Nodal conductance matrix G (W/K).
    const g = new Float64Array(n * n);
    const link = (i: number, j: number, gij: number) => {
      g[i * n + i] += gij;
      g[j * n + j] += gij;
      g[i * n + j] -= gij;
      g[j * n + i] -= gij;
    };
    for (let i = 0; i < nc - 1; i++) link(i, i + 1, 1 / cauer[i].rKPerW);
    if (this.hasSinkNode) {
      link(nc - 1, nc, 1 / (rLast + rcs));
      g[nc * n + nc] += 1 / rsa;
    } else {
      g[(nc - 1) * n + nc - 1] += 1 / (rLast + rcs + rsa);
    }
    const m = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) m[i * n + j] = g[i * n + j] / Math.sqrt(cap[i] * cap[j]);
    const { values, vectors } = symmetricEigen(m, n);
    this.ratesPerS = values;
    this.nodeFromModal = new Float64Array(n * n);
    this.modalFromNode = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      for (let k = 0; k < n; k++) {
        this.nodeFromModal[i * n + k] = vectors[i * n + k] / Math.sqrt(cap[i]);
        this.modalFromNode[k * n + i] = vectors[i * n + k] * Math.sqrt(cap[i]);
      }
    }
    this.junctionWeights = this.nodeFromModal.slice(0, n);
    const lastNode = this.nodeFromModal.slice((nc - 1) * n, nc * n);
    this.caseWeights = new Float64Array(n);
    this.sinkWeights = new Float64Array(n);
    if (this.hasSinkNode) {
      const sinkNode = this.nodeFromModal.slice(nc * n, (nc + 1) * n);
      for (let k = 0; k < n; k++) {
        this.sinkWeights[k] = sinkNode[k];
        // θ_case = θ_s + R_cs·(θ_n − θ_s)/(Rₙ + R_cs)
        this.caseWeights[k] = (rcs * lastNode[k] + rLast * sinkNode[k]) / (rLast + rcs);
      }
    } else {
      const rTail = rLast + rcs + rsa;
      for (let k = 0; k < n; k++) {
        this.caseWeights[k] = ((rcs + rsa) / rTail) * lastNode[k];
        this.sinkWeights[k] = (rsa / rTail) * lastNode[k];
      }
    }
    let rSum = rcs + rsa;
    for (const s of cauer) rSum += s.rKPerW;
    this.totalRKPerW = rSum;
  }

  /**
   * Builds the network of a device's thermal path: Foster → Cauer (Lanczos synthesis), then the
   * case–sink and sink–ambient elements. Throws RangeError on an empty Foster list or negative
   * values (profiles are validated before this).
   */
  static fromPath(path: ThermalPath): ThermalNetwork {
    return ThermalNetwork.fromCauer(fosterToCauer(path.foster), path);
  }

  /** Builds the network from an explicit junction–case Cauer ladder (junction first). */
  static fromCauer(cauer: readonly CauerStage[], ext: Omit<ThermalPath, 'foster'>): ThermalNetwork {
    if (cauer.length === 0) throw new RangeError('ThermalNetwork: the Cauer ladder is empty');
    cauer.forEach((s, i) => {
      if (!(s.rKPerW > 0) || !(s.cJPerK > 0)) {
        throw new RangeError(`ThermalNetwork: Cauer stage ${i} needs R > 0 and C > 0, got ${s.rKPerW} K/W, ${s.cJPerK} J/K`);
      }
    });
    for (const k of ['caseToSinkKPerW', 'sinkToAmbientKPerW', 'sinkHeatCapacityJPerK'] as const) {
      const v = ext[k];
      if (typeof v !== 'number' || !(v >= 0) || !Number.isFinite(v)) {
        throw new RangeError(`ThermalNetwork: ${k} must be a finite number ≥ 0, got ${String(v)}`);
      }
    }
    return new ThermalNetwork(cauer, ext);
  }

  /** A state at ambient (all rises 0). */
  createState(): Float64Array {
    return new Float64Array(this.nodeCount);
  }

  /** Junction rise above ambient in K: θ_j = Σ bₖxₖ. */
  junctionRiseK(state: Float64Array): number {
    let s = 0;
    for (let k = 0; k < this.nodeCount; k++) s += this.junctionWeights[k] * state[k];
    return s;
  }

  /** Case rise above ambient in K (the end of the junction–case ladder). */
  caseRiseK(state: Float64Array): number {
    let s = 0;
    for (let k = 0; k < this.nodeCount; k++) s += this.caseWeights[k] * state[k];
    return s;
  }

  /** Sink rise above ambient in K (= R_sa·heat flow when the sink has no mass). */
  sinkRiseK(state: Float64Array): number {
    let s = 0;
    for (let k = 0; k < this.nodeCount; k++) s += this.sinkWeights[k] * state[k];
    return s;
  }

  /** Node rises in K (Cauer nodes from the junction, then the sink node if it is a state). */
  nodeRisesK(state: Float64Array): Float64Array {
    const n = this.nodeCount;
    const out = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += this.nodeFromModal[i * n + k] * state[k];
      out[i] = s;
    }
    return out;
  }

  /** Modal state from node rises (inverse of {@link nodeRisesK}); throws RangeError on a wrong length. */
  stateFromNodeRisesK(rises: ArrayLike<number>): Float64Array {
    const n = this.nodeCount;
    if (rises.length !== n) throw new RangeError(`ThermalNetwork: node rises need length ${n}, got ${rises.length}`);
    const out = new Float64Array(n);
    for (let k = 0; k < n; k++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += this.modalFromNode[k * n + i] * rises[i];
      out[k] = s;
    }
    return out;
  }

  /**
   * Update coefficients for an interval of Δt seconds (see {@link StepCoefficients}); pass `out`
   * to reuse buffers in a hot loop. Δt = 0 gives the identity update.
   */
  coefficients(dtS: number, out?: StepCoefficients): StepCoefficients {
    const n = this.nodeCount;
    const c: StepCoefficients = out ?? {
      dtS,
      decay: new Float64Array(n),
      gain: new Float64Array(n),
      meanFromState: new Float64Array(n),
      meanRisePerW: 0,
      endRisePerW: 0,
    };
    c.dtS = dtS;
    let meanPerW = 0;
    let endPerW = 0;
    for (let k = 0; k < n; k++) {
      const lam = this.ratesPerS[k];
      const b = this.junctionWeights[k];
      const z = lam * dtS;
      const oneMinusDecay = -Math.expm1(-z);
      c.decay[k] = 1 - oneMinusDecay;
      c.gain[k] = (b / lam) * oneMinusDecay;
      c.meanFromState[k] = z > 0 ? (b * oneMinusDecay) / z : b;
      meanPerW += ((b * b) / lam) * oneMinusPhi1(z);
      endPerW += ((b * b) / lam) * oneMinusDecay;
    }
    c.meanRisePerW = meanPerW;
    c.endRisePerW = endPerW;
    return c;
  }

  /**
   * Coefficients for an interval of Δt seconds with no power: the decay alone (the same values
   * {@link coefficients} gives), the gains zero, the mean terms left unset. For the idle stretches
   * of a hot loop, where only `advance(state, 0, c)` reads them; keep `out` apart from buffers
   * that {@link solve}-style readers use.
   */
  decayCoefficients(dtS: number, out: StepCoefficients): StepCoefficients {
    out.dtS = dtS;
    for (let k = 0; k < this.nodeCount; k++) {
      out.decay[k] = 1 + Math.expm1(-this.ratesPerS[k] * dtS);
      out.gain[k] = 0;
    }
    return out;
  }

  /** Exact update of `state` in place for a power held over the interval of `c`. */
  advance(state: Float64Array, powerW: number, c: StepCoefficients): void {
    for (let k = 0; k < this.nodeCount; k++) state[k] = state[k] * c.decay[k] + c.gain[k] * powerW;
  }

  /** Junction rise averaged over the interval of `c` (K) if `powerW` is held from `state`. */
  meanJunctionRiseK(state: Float64Array, powerW: number, c: StepCoefficients): number {
    let s = 0;
    for (let k = 0; k < this.nodeCount; k++) s += c.meanFromState[k] * state[k];
    return s + c.meanRisePerW * powerW;
  }

  /**
   * Exact update over Δt seconds of constant power (allocates coefficients; use
   * {@link coefficients} + {@link advance} in loops).
   *
   * @example net.step(x, 50, 0.01) // 10 ms at 50 W
   */
  step(state: Float64Array, powerW: number, dtS: number): void {
    this.advance(state, powerW, this.coefficients(dtS));
  }

  /**
   * Single-pulse junction-to-ambient thermal impedance in K/W at t seconds after a power step from
   * rest: Zth(t) = Σ (bₖ²/λₖ)(1 − e^(−λₖt)) (the network's Foster equivalent; NXP AN11261).
   */
  zthKPerW(tS: number): number {
    if (!(tS > 0)) return 0;
    let z = 0;
    for (let k = 0; k < this.nodeCount; k++) {
      const lam = this.ratesPerS[k];
      const b = this.junctionWeights[k];
      z += ((b * b) / lam) * -Math.expm1(-lam * tS);
    }
    return z;
  }

  /** Steady-state junction rise in K for a constant power: P·(ΣR_jc + R_cs + R_sa). */
  steadyStateRiseK(powerW: number): number {
    return powerW * this.totalRKPerW;
  }

  /** The network's junction-to-ambient response as a Foster set: Rₖ = bₖ²/λₖ, τₖ = 1/λₖ. */
  fosterEquivalent(): FosterStage[] {
    return Array.from(this.ratesPerS, (lam, k) => ({
      rKPerW: (this.junctionWeights[k] * this.junctionWeights[k]) / lam,
      tauS: 1 / lam,
    }));
  }
}
