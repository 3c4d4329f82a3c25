/** The render's limits (scripts/render-notebook.js): a cell timeout and a bounded wait for the kernel's shutdown. */
import { describe, expect, it } from 'vitest';
 
const { parseArgs } = require('../../scripts/render-notebook.js') as { parseArgs: (a: string[]) => Record<string, unknown> };

describe('render limits', () => {
  it('reads --cell-timeout and --shutdown-wait, refusing values that are not seconds', () => {
    expect(parseArgs(['a.ipynb', '--cell-timeout', '5', '--shutdown-wait', '7'])).toMatchObject({ cellTimeout: 5, shutdownWait: 7 });
    expect(() => parseArgs(['a.ipynb', '--cell-timeout', '-1'])).toThrow('--cell-timeout: expected a number of seconds > 0, got "-1"');
  });

});
