export * from './types';
export { criticalCoupling, defaultCriticalCouplingOptions } from './critical-coupling';
