import { describe, expect, it } from 'vitest';
import { staleSources } from '../support/fresh-build.js';

// The worker pool loads compiled modules from dist/ (src/parallel/pool.ts,
// compiledModule); the global set-up compiles when a source is newer. This
// check fails if that set-up is removed or fails to bring dist/ up to date.
describe('compiled twins used by worker and CLI tests', () => {
  it('every source under src/ and bench/ has a compiled twin no older than itself', () => {
    expect(staleSources()).toEqual([]);
  });
});
