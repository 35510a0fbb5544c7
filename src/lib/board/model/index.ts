export * from './schema';
export * from './ops';
