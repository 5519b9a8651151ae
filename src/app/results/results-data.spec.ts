import type { WindowSummaryDto } from '../../../shared/api/live.js';
import { mergeWindows } from './results-data';

const w = (window: number): WindowSummaryDto => ({ window, tStartS: window, tEndS: window + 1, adaptiveDb: [], conventionalDb: [], sinrDb: [] });

describe('merging live windows', () => {
  it('appends only the next windows in order and drops repeats (REST and live may overlap)', () => {
    const have = [w(0), w(1)];
    expect(mergeWindows(have, [w(1), w(2), w(3)]).map((x) => x.window)).toEqual([0, 1, 2, 3]);
    expect(mergeWindows(have, [w(0), w(1)])).toBe(have);
    // a gap is not papered over: window 5 waits until 2..4 arrive
    expect(mergeWindows(have, [w(5)]).map((x) => x.window)).toEqual([0, 1]);
  });
});
