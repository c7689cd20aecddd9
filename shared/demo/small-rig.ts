/**
 * The demo small rig, INVENTED (no real product or part; plausible orders of magnitude): a
 * hand-wound secondary a few centimetres across with a small sphere on top, a few-turn primary,
 * one bipolar transistor that switches in step with the coil (its base fed back from the coil: the
 * `single-switch` topology at the coil's resonance, with a forced gain), and a MOSFET in series with
 * a 24 V supply whose gate takes the music (`rail-linear`). The bipolar switch stands in free air,
 * with no heat sink; the pass MOSFET has a small clip-on sink.
 *
 * The figures are chosen so that the switch is fast enough for this coil (transition share 0.158 at
 * its 480 kHz resonance, below the 0.2 limit) but only just: its transitions dominate its
 * loss, and in free air its junction temperature is what limits the gain of the demo clip harbour-lights.
 */
import type { CoilProfile } from '../schemas/coil.ts';
import type { DriverProfile } from '../schemas/driver.ts';

/**
 * Small coil: 50 mm former, 160 mm of 0.16 mm wire (1000 turns), 80 mm sphere, 5-turn primary;
 * computed resonance ≈ 490 kHz. The measured figures stand for a bench ring-down: resonance 480 kHz
 * (a little below the computed one, as mounted coils are) and a loaded Q of 70 (the computed Q is an
 * upper bound several times higher).
 */
export const DEMO_SMALL_COIL: CoilProfile = {
  name: 'thimble',
  secondary: { formDiameterM: 0.05, windingLengthM: 0.16, turns: 1000, wireDiameterM: 0.00016 },
  topLoad: { shape: 'sphere', diameterM: 0.08 },
  extraCapacitanceF: 0,
  primary: { turns: 5, diameterM: 0.07, windingLengthM: 0.015, offsetM: 0 },
  measured: { resonanceHz: 480_000, qualityFactor: 70 },
};

/**
 * Single-bipolar driver with a series MOSFET modulator: 24 V supply, 0.97 A at the full rail. At
 * silence the rail idles at 12 V and the pass MOSFET dissipates g·V_s²/4 = 5.82 W on its sink; the
 * bipolar switch, idling, would settle near 140 °C: safe below its 150 °C maximum, but above the
 * plan's 125 °C limit, which it reaches after about half a minute of idling from cold (the plan says
 * so).
 *
 * @example simulateRail(DEMO_SMALL_DRIVER, coil, rail)
 */
export const DEMO_SMALL_DRIVER: DriverProfile = {
  name: 'Finch-24 single bipolar (demo)',
  notes: 'Invented demo rig: one bipolar switch in free air, fed back from the coil; series MOSFET on the rail takes the music.',
  topology: 'single-switch',
  supplyVoltageV: 24,
  fullRailCurrentA: 0.97,
  supplyCurrentLimitA: 2,
  ambientC: 25,
  scheme: 'rail-linear',
  devices: [
    {
      role: 'bridge',
      kind: 'bjt',
      vceSatV: 0.35,
      vceSatAtCurrentA: 4,
      forcedGain: 10,
      vbeSatV: 0.95,
      riseTimeS: 40e-9,
      fallTimeS: 70e-9,
      storageTimeS: 220e-9,
      outputCapacitanceF: 40e-12,
      tjMaxC: 150,
      thermal: {
        // Free air: junction–case Foster set, then the package to ambient (R_th(j-a) 75 K/W less the
        // 4.2 K/W of the Foster sum) with the package's own heat capacity.
        foster: [
          { rKPerW: 0.5, tauS: 2e-4 },
          { rKPerW: 1.5, tauS: 3e-3 },
          { rKPerW: 2.2, tauS: 4e-2 },
        ],
        caseToSinkKPerW: 0,
        sinkToAmbientKPerW: 70.8,
        sinkHeatCapacityJPerK: 0.21,
      },
    },
    {
      role: 'pass',
      kind: 'mosfet',
      rdsOnOhm: 0.05,
      rdsOnTempCoeffPerK: 0.007,
      riseTimeS: 0,
      fallTimeS: 0,
      outputCapacitanceF: 5e-10,
      tjMaxC: 175,
      thermal: {
        foster: [
          { rKPerW: 0.15, tauS: 1e-4 },
          { rKPerW: 0.6, tauS: 2e-3 },
          { rKPerW: 0.9, tauS: 2e-2 },
        ],
        caseToSinkKPerW: 0.8,
        sinkToAmbientKPerW: 11,
        sinkHeatCapacityJPerK: 12,
      },
    },
  ],
};

/** The demo small rig: its coil and its driver, planned together. */
export const DEMO_SMALL_RIG: Readonly<{ coil: CoilProfile; driver: DriverProfile }> = { coil: DEMO_SMALL_COIL, driver: DEMO_SMALL_DRIVER };
