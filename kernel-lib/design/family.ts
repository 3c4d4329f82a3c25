/**
 * Response families: how a response value is drawn around its mean. Pluggable so that
 * count or binary responses can join later; only the gaussian family exists now.
 */
import type { Stream } from '../random/stream';

/** Family parameters by name, taken from `truth.sd` of the design (e.g. `residual`). */
export type FamilyParams = Readonly<Record<string, number>>;

export interface ResponseFamily {
  name: string;
  /** Keys this family reads from `truth.sd`, each required and ≥ 0. */
  params: readonly string[];
  /** One response value given its mean (the linear predictor on the family's scale). */
  draw(mean: number, stream: Stream, params: FamilyParams): number;
}

/** y = mean + residual · z, z standard normal. */
export const gaussianFamily: ResponseFamily = {
  name: 'gaussian',
  params: ['residual'],
  draw(mean: number, stream: Stream, params: FamilyParams): number {
    return mean + params.residual * stream.normal();
  },
};

export const RESPONSE_FAMILIES: Readonly<Record<string, ResponseFamily>> = { gaussian: gaussianFamily };
