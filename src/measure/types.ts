/**
 * The shape every measurement importer gives; it is defined with the plan (src/plan/types.ts),
 * which keeps measurements in this shape, so the plan needs nothing from measure/.
 */
export type { MeasuredResponse } from '../plan/types';
