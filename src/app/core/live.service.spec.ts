import { reconnectDelayMs } from './live.service';

describe('live channel reconnect back-off', () => {
  it('doubles from 0.5 s, caps at 15 s, and jitters by ±20 %', () => {
    const mid = () => 0.5;
    expect([0, 1, 2, 3, 4, 5, 6].map((n) => reconnectDelayMs(n, mid))).toEqual([500, 1000, 2000, 4000, 8000, 15000, 15000]);
    expect(reconnectDelayMs(0, () => 0)).toBe(400);
    expect(reconnectDelayMs(0, () => 1)).toBe(600);
    expect(reconnectDelayMs(50, () => 1)).toBe(18000);
  });
});
