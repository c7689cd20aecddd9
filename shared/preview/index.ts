/** The previews: what the coil will make of a clip, to see (modulation) and to hear (arc sound). */
export * from './modulation.ts';
export * from './arc-sound.ts';
export * from './grid.ts';
export * from './sample-blocks.ts';
