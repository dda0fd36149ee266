export * from './errors.ts';
export * from './yaml.ts';
export * from './conditions.ts';
export * from './pipeline.ts';
export * from './version.ts';
