export * from './schema';
export * from './ops';
export * from './policy';
