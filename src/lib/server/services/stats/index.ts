// The statistics engine, by topic: selections resolved against the shop, aggregates from
// queries/stats, finished with the pure functions of stats/. Each function takes a connection
// inside the shop's scope (tests call them in their own transactions) and returns the JSON of a
// /api/v1 statistics route, shaped by $lib/contract. Routes call the scoped entry points of
// ./for-shop.ts instead.
export { resolveFamily, selection } from './selection';
export { compare, distribution } from './distribution';
export { checkReading } from './check';
export { outliers } from './outliers';
export { comebacks, rates } from './rates';
export { firstPass } from './first-pass';
export { capabilityByMachinist, capabilityStudy } from './capability';
export { BASELINE_DEFAULT_N, BASELINE_MIN_N, control, pchart, recomputeBaseline } from './control';
export { wear } from './wear';
export { describeValues } from './describe';
export type { DataSource } from '../../../contract';
