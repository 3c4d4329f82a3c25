import { SMALL_SAMPLE_METHODS } from './inference/intervals';

/** Interval methods the engine provides (the last four: ./inference). */
export const INTERVAL_METHODS = ['wald', 'residual-t', ...SMALL_SAMPLE_METHODS] as const;
export type IntervalMethod = (typeof INTERVAL_METHODS)[number];
