// SQL behind the statistics API, by topic. Heavy aggregation happens here; services/stats/
// finishes the work with the pure functions in stats/.
export * from './selection';
export * from './window';
export * from './distribution';
export * from './outliers';
export * from './rates';
export * from './series';
export * from './control';
