import { describe, expect, it } from 'vitest';
import { isMissing } from '../../kernel-lib/data/missing';

describe('isMissing', () => {
  it('treats null, undefined, NaN and the empty string as missing, nothing else', () => {
    // The data layer's one rule (module contract, common practice, no source): arquero and CSV
    // readers give null or NaN for absent cells, hand-written records undefined or ''.
    for (const v of [null, undefined, NaN, '']) expect(isMissing(v)).toBe(true);
    // present values, including the ones a looser rule might swallow
    for (const v of [0, -0, false, ' ', 'NA', 'NaN', '0', Infinity, [], {}]) expect(isMissing(v)).toBe(false);
  });
});
