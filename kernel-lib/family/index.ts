/** Every response family by name: the one list that design parsing, simulation and the fit read. */
import { gaussianFamily } from './gaussian';
import { poissonFamily } from './poisson';
import { binomialFamily } from './binomial';
import { negativeBinomialFamily } from './negative-binomial';
import type { FamilyName, ResponseFamily } from './types';

export type { FamilyName, FamilyParams, LinkName, ResponseFamily } from './types';

export const RESPONSE_FAMILIES: Readonly<Partial<Record<FamilyName, ResponseFamily>>> = {
  gaussian: gaussianFamily,
  poisson: poissonFamily,
  binomial: binomialFamily,
  'negative-binomial': negativeBinomialFamily,
};

/** The family of that name, or undefined when there is none. */
export function responseFamily(name: unknown): ResponseFamily | undefined {
  return typeof name === 'string' && Object.prototype.hasOwnProperty.call(RESPONSE_FAMILIES, name)
    ? RESPONSE_FAMILIES[name as FamilyName]
    : undefined;
}
