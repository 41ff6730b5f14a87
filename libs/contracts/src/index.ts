export * from './roles';
export * from './sections';
export * from './errors';
export * from './auth';
export * from './users';
export * from './depots';
export * from './rates';
export * from './depot-setup';
