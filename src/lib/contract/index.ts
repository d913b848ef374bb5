// The /api/v1 response contract: one zod schema per answer (see common.ts).
export * from './common';
export * from './stats';
export * from './readings';
export * from './shop';
export * from './imports';
