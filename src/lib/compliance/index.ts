export * from './criteria';
export * from './judge';
