/**
 * Invented demo coil profiles (no real product): a desk-size coil, a small one, a larger one, and
 * the small single-transistor rig's coil.
 * Each is a valid CoilProfile (checked in test/shared/physics/coil/demo-coils.test.ts) and runs
 * with `coilcue coil --demo <name>`.
 */
import type { CoilProfile } from '../schemas/coil.ts';
import { DEMO_SMALL_COIL } from './small-rig.ts';

/** Demo coils by name. Dimensions SI; wire diameters are copper diameters. */
export const DEMO_COILS: Readonly<Record<string, CoilProfile>> = {
  /** Desk-size: 75 mm former, 300 mm of 0.25 mm wire (1000 turns), 200 × 50 mm torus. */
  'desk-lantern': {
    name: 'desk-lantern',
    secondary: { formDiameterM: 0.075, windingLengthM: 0.3, turns: 1000, wireDiameterM: 0.00025 },
    topLoad: { shape: 'torus', outerDiameterM: 0.2, tubeDiameterM: 0.05 },
    extraCapacitanceF: 0,
    primary: { turns: 4, diameterM: 0.1, windingLengthM: 0.012, offsetM: 0 },
    measured: { resonanceHz: null, qualityFactor: null },
  },
  /** Small: 50 mm former, 150 mm of 0.2 mm wire (600 turns), 60 mm sphere. */
  'pocket-spark': {
    name: 'pocket-spark',
    secondary: { formDiameterM: 0.05, windingLengthM: 0.15, turns: 600, wireDiameterM: 0.0002 },
    topLoad: { shape: 'sphere', diameterM: 0.06 },
    extraCapacitanceF: 0,
    primary: { turns: 5, diameterM: 0.07, windingLengthM: 0.015, offsetM: 0.005 },
    measured: { resonanceHz: null, qualityFactor: null },
  },
  /** Larger: 110 mm former, 450 mm of 0.4 mm wire (1100 turns), 300 × 75 mm torus. */
  'bench-tower': {
    name: 'bench-tower',
    secondary: { formDiameterM: 0.11, windingLengthM: 0.45, turns: 1100, wireDiameterM: 0.0004 },
    topLoad: { shape: 'torus', outerDiameterM: 0.3, tubeDiameterM: 0.075 },
    extraCapacitanceF: 0,
    primary: { turns: 6, diameterM: 0.15, windingLengthM: 0.03, offsetM: 0.01 },
    measured: { resonanceHz: null, qualityFactor: null },
  },
  /** The small rig's coil (./small-rig.ts): 50 mm former, 1000 turns, 80 mm sphere, a measured Q. */
  thimble: DEMO_SMALL_COIL,
};

/** Names of the demo coils, in a fixed order (the small rig's coil last). */
export const DEMO_COIL_NAMES: readonly string[] = Object.keys(DEMO_COILS);
