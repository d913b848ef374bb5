import { pgEnum } from 'drizzle-orm/pg-core';
import { BORE_DIRECTIONS, BORE_HEIGHTS, DECISION_KINDS, MEASUREMENTS, ROLES, SIDES, STAGES, type DecisionKind } from '../../../measurements';

export const roleEnum = pgEnum('role', ROLES);
export const stageEnum = pgEnum('stage', STAGES);
export const sideEnum = pgEnum('side', SIDES);
export const measurementEnum = pgEnum('measurement', MEASUREMENTS);
export const boreDirectionEnum = pgEnum('bore_direction', BORE_DIRECTIONS);
export const boreHeightEnum = pgEnum('bore_height', BORE_HEIGHTS);

export const HEAD_STATUSES = ['received', 'inspected', 'in_rework', 'final_check', 'released'] as const;
export type HeadStatus = (typeof HEAD_STATUSES)[number];
export const headStatusEnum = pgEnum('head_status', HEAD_STATUSES);

export const LEAK_PATHS = ['none', 'intake', 'exhaust', 'crankcase', 'coolant'] as const;
export type LeakPath = (typeof LEAK_PATHS)[number];
export const leakPathEnum = pgEnum('leak_path', LEAK_PATHS);

export { DECISION_KINDS, type DecisionKind };
export const decisionKindEnum = pgEnum('decision_kind', DECISION_KINDS);

export const BATCH_STATUSES = ['running', 'committed', 'failed', 'undone'] as const;
export const batchStatusEnum = pgEnum('batch_status', BATCH_STATUSES);
