import { describe, expect, it } from 'vitest';
import { createProgressThrottle } from './progress-throttle';

describe('createProgressThrottle', () => {
  it('passes the first report, then one per interval on the given clock', () => {
    let clock = 0;
    const shouldSend = createProgressThrottle({ minIntervalMs: 100, now: () => clock });
    const passed: number[] = [];
    for (let i = 0; i < 10; i++) {
      clock = i * 40; // 0, 40, 80, ..., 360 ms
      if (shouldSend(i / 20)) passed.push(clock);
    }
    expect(passed).toEqual([0, 120, 240, 360]);
  });

  it('always passes the end (fraction 1), once', () => {
    const shouldSend = createProgressThrottle({ minIntervalMs: 1000, now: () => 5 });
    expect(shouldSend(0.1)).toBe(true);
    expect(shouldSend(0.2)).toBe(false);
    expect(shouldSend(1)).toBe(true);
    expect(shouldSend(1)).toBe(false);
  });
});
