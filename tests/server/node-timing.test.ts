/**
 * Queue timing settings from the environment: defaults, derived tick and reaper periods, and
 * refusals that name the variable, its value and the allowed range.
 */
import { expect } from 'chai';
import { nodeTimingFromEnv } from '../../server/nodes/node-timing.js';

describe('node timing from the environment', () => {
  it('uses the documented defaults (README settings table)', () => {
    const t = nodeTimingFromEnv({});
    expect(t).to.deep.include({ leaseMs: 30_000, pollMs: 2000, tickMs: 1000, reapMs: 10_000 });
    expect(t.backoff).to.deep.equal({ baseMs: 10_000, capMs: 600_000 });
  });

  it('refuses values out of range, naming the variable and what is allowed', () => {
    expect(() => nodeTimingFromEnv({ JOB_CHECKPOINT_SECONDS: '0.01' })).to.throw(/JOB_CHECKPOINT_SECONDS="0.01": must be at least 0.05/);
    expect(() => nodeTimingFromEnv({ JOB_CHECKPOINT_SECONDS: 'often' })).to.throw(/JOB_CHECKPOINT_SECONDS="often": must be a number of seconds/);
    expect(() => nodeTimingFromEnv({ JOB_LEASE_SECONDS: '1' })).to.throw(/JOB_LEASE_SECONDS="1": must be at least 2 seconds/);
    expect(() => nodeTimingFromEnv({ JOB_CHECKPOINT_SECONDS: '0.5' })).to.not.throw();
  });
});
