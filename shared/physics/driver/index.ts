/** Driver models: currents, per-switch losses, electrothermal coupling and the simulations. */
export * from './currents.ts';
export * from './losses.ts';
export * from './bjt.ts';
export * from './transition.ts';
export * from './electrothermal.ts';
export * from './types.ts';
export { DeviceRun, DEFAULT_WARN_MARGIN_K, type FrameLossModel } from './device-run.ts';
export { simulateRail, frameLossModel } from './simulate-rail.ts';
export { deviceWarnings } from './common.ts';
export { simulatePulses } from './simulate-pulses.ts';
