import { describe, expect, it } from 'vitest';
import { resolveGridPath } from '../../kernel-lib/design/grid-path';
import { inputError } from '../helpers/input-error';

// Dotted paths into the design JSON (module contract: a segment inside an array of named objects is
// an element's name, inside a plain array an index). Expected targets written by hand.
const source = {
  perCell: 2,
  factors: [{ name: 'site', levels: 6 }, { name: 'year', levels: 3 }],
  truth: { sd: { site: 1, residual: 2 } },
  trials: [4, 8],
  variants: [{ name: 'both', model: { level: 0.95, fixed: ['rain'] } }],
};

describe('resolveGridPath', () => {
  it('finds values by key, by element name and by index', () => {
    expect(resolveGridPath(source, 'perCell', 'grid')).toEqual({ container: source, key: 'perCell' });
    const year = resolveGridPath(source, 'factors.year.levels', 'grid');
    expect(year.container).toBe(source.factors[1]);
    expect(year.key).toBe('levels');
    expect(resolveGridPath(source, 'truth.sd.site', 'grid').container).toBe(source.truth.sd);
    expect(resolveGridPath(source, 'trials.1', 'grid')).toEqual({ container: source.trials, key: 1 });
    expect(resolveGridPath(source, 'variants.both.model.level', 'grid').container).toBe(source.variants[0].model);
    // an element named by number text is still found by index when no name matches
    expect(resolveGridPath(source, 'factors.0.levels', 'grid').container).toBe(source.factors[0]);
  });

  it('refuses paths that lead nowhere or to something that is not a number or text, saying what is there', () => {
    const f = 'grid["factors.plot.levels"]';
    expect(inputError(() => resolveGridPath(source, 'factors.plot.levels', f)).message).toMatch(/nothing at "factors\.plot" \(names: site, year\)/);
    expect(inputError(() => resolveGridPath(source, 'truth.sd.plot', f)).message).toMatch(/keys there: site, residual/);
    expect(inputError(() => resolveGridPath(source, 'trials.2', f)).message).toMatch(/indices 0\.\.1/);
    expect(inputError(() => resolveGridPath(source, 'perCell.x', f)).message).toMatch(/continues past a value/);
    expect(inputError(() => resolveGridPath(source, 'truth.sd', f)).message).toMatch(/holds an object, not a number or text/);
    expect(inputError(() => resolveGridPath(source, 'truth..sd', f)).message).toMatch(/expected a dotted path/);
    expect(inputError(() => resolveGridPath({ grid: {} }, 'grid.x', f)).message).toMatch(/cannot change itself/);
    expect(inputError(() => resolveGridPath(source, 'perCell.x', f)).field).toBe(f);
  });
});
