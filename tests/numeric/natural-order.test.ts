import { describe, expect, it } from 'vitest';
import { naturalOrder } from '../../kernel-lib/numeric/natural-order';

// The order a field analyst expects (common practice, no source): time and numbers by value.
describe('naturalOrder', () => {
  it('orders numbers and years by value, not as text', () => {
    expect(naturalOrder(['2023', '2021', '2022'])).toEqual(['2021', '2022', '2023']);
    expect(naturalOrder(['10', '9', '1.5', '-2'])).toEqual(['-2', '1.5', '9', '10']);
  });

  it('orders labels of one stem by their number', () => {
    expect(naturalOrder(['plot10', 'plot2', 'plot1'])).toEqual(['plot1', 'plot2', 'plot10']);
  });

  it('keeps other labels in the order given, once each', () => {
    expect(naturalOrder(['spring', 'summer', 'autumn', 'spring'])).toEqual(['spring', 'summer', 'autumn']);
    expect(naturalOrder(['site2', 'plot1'])).toEqual(['site2', 'plot1']);
  });
});
