export * from './conversions';
export * from './ultimate';
export * from './tuning';
export * from './reduction';
export * from './design';
