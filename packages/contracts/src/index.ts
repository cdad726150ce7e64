export * from './common';
export * from './identity';
export * from './catalog';
export * from './loans';
export * from './system';
export * from './notifications';
export * from './payments';
export * from './shipments';
