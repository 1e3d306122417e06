// Re-exports of the API schemas; each area adds its own line.
export * from './errors';
export * from './auth';
export * from './groups';
export * from './admin';
