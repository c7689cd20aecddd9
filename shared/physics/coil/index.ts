/** The coil model: inductance, capacitance, coupling, losses, resonance, voltage and clearance. */
export * from './nagaoka.ts';
export * from './inductance.ts';
export * from './mutual.ts';
export * from './self-capacitance.ts';
export * from './top-load.ts';
export * from './wire.ts';
export * from './resonance.ts';
export * from './voltage.ts';
export * from './analyze.ts';
