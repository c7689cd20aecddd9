/** Thermal models: Foster and Cauer networks, and a device's junction-to-ambient network. */
export * from './foster.ts';
export * from './cauer.ts';
export * from './network.ts';
