import { describe, it, expect } from 'vitest';
import { vesselBars } from '../../src/lib/board';
import { utc } from '../helpers/time';
import { ferment, run } from '../helpers/board-rows';

/**
 * The fermenter is freed by the run that empties it: an emptied wash's bar ends at its emptying; a
 * wash a done run took only part of still holds wash, so a done run does not end its bar.
 */
describe('vessel occupancy after runs have taken wash', () => {
  const half = (id: number, fermentId: number, over: Parameters<typeof run>[1] = {}) => run(id, { ferments: [{ fermentId, litres: 1200 }], ...over });
  it.each([
    [
      'a wash emptied by its run ends at the emptying, not at the run booked on it',
      [ferment(1, { emptiedAt: utc('2026-12-03T12:05') })],
      [half(1, 1, { status: 'done' }), half(2, 1)],
      { freeAt: '2026-12-03T12:05', freedBy: 'emptied' },
    ],
    [
      'a wash a done run took half of waits for the next run booked on it',
      [ferment(1)],
      [half(1, 1, { status: 'done' }), half(2, 1, { startsAt: utc('2026-12-05T06:00') })],
      { freeAt: '2026-12-05T06:00', freedBy: 'run' },
    ],
    ['a wash a done run took half of, with nothing else booked, stays open', [ferment(1)], [half(1, 1, { status: 'done' })], { freeAt: null, freedBy: null }],
    [
      'a running run still frees the fermenter from its start',
      [ferment(1)],
      [half(1, 1, { status: 'running', startsAt: utc('2026-12-04T06:00') })],
      { freeAt: '2026-12-04T06:00', freedBy: 'run' },
    ],
  ] as const)('%s', (_what, fs, runs, expected) => {
    const bar = vesselBars([{ id: 1 }], fs, runs).get(1)![0]!;
    expect({ freeAt: bar.freeAt ? bar.freeAt.toISOString() : null, freedBy: bar.freedBy }).toEqual({
      freeAt: expected.freeAt ? utc(expected.freeAt).toISOString() : null,
      freedBy: expected.freedBy,
    });
  });
});
