/** Grain physics, one concept per file; this module gathers them. */
export * from './grain-properties.ts';
export * from './grain-accretion.ts';
export * from './grain-desorption.ts';
export * from './grain-surface.ts';
export * from './grain-h2.ts';
