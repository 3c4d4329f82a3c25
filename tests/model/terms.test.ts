import { describe, expect, it } from 'vitest';
import {
  bracketFormToCurrent, groupMeanName, involvesLevelOf, isInteraction, isLevelOf, levelName, productName,
  splitLevelName, termColumns, termLabel,
} from '../../kernel-lib/model/terms';

// The project's naming convention for coefficients (binding rule: `grazing=ungrazed`, interactions
// `soil_moisture:grazing=ungrazed`); expected names written out by hand from that rule.
describe('fixed terms', () => {
  it('a main effect reads one column, an interaction two', () => {
    expect(termColumns('soil_moisture')).toEqual(['soil_moisture']);
    expect(termColumns('soil_moisture:grazing')).toEqual(['soil_moisture', 'grazing']);
    expect(termColumns({ column: 'rain', reference: 'low' })).toEqual(['rain']);
    expect(isInteraction('soil_moisture:grazing')).toBe(true);
    expect(isInteraction('grazing')).toBe(false);
    expect(isInteraction({ column: 'a:b' })).toBe(false);
    expect(termLabel({ column: 'rain' })).toBe('rain');
    expect(termLabel('a:b')).toBe('a:b');
  });
});

describe('coefficient names', () => {
  it('spells levels and products as in the project rule', () => {
    expect(levelName('grazing', 'ungrazed')).toBe('grazing=ungrazed');
    expect(productName('soil_moisture', levelName('grazing', 'ungrazed'))).toBe('soil_moisture:grazing=ungrazed');
    expect(groupMeanName('rain', 'site')).toBe('rain_mean_site');
  });

  it('recognises the levels of a column, also inside an interaction, without prefix clashes', () => {
    expect(isLevelOf('grazing=ungrazed', 'grazing')).toBe(true);
    // "grazing_type=x" is not a level of "grazing"
    expect(isLevelOf('grazing_type=x', 'grazing')).toBe(false);
    expect(involvesLevelOf('soil_moisture:grazing=ungrazed', 'grazing')).toBe(true);
    expect(involvesLevelOf('soil_moisture:grazing_type=x', 'grazing')).toBe(false);
  });

  it('splits a level part at its first "=", so levels may contain "="', () => {
    expect(splitLevelName('grazing=ungrazed')).toEqual({ column: 'grazing', level: 'ungrazed' });
    expect(splitLevelName('depth=0=10cm')).toEqual({ column: 'depth', level: '0=10cm' });
    expect(splitLevelName('rain')).toBeUndefined();
    expect(splitLevelName('=x')).toBeUndefined();
    expect(splitLevelName('x=')).toBeUndefined();
  });

  it('converts the earlier bracket spelling, part by part', () => {
    expect(bracketFormToCurrent('grazing[ungrazed]')).toBe('grazing=ungrazed');
    expect(bracketFormToCurrent('soil_moisture:grazing[ungrazed]')).toBe('soil_moisture:grazing=ungrazed');
    expect(bracketFormToCurrent('grazing=ungrazed')).toBeUndefined();
    expect(bracketFormToCurrent('a[b][c]')).toBeUndefined();
  });
});
