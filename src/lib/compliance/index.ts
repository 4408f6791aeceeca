export * from './criteria';
export * from './judge';
export * from './shortfall';
