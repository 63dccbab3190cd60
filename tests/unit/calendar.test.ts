import { describe, expect, it } from 'vitest';
import ICAL from 'ical.js';
import nodeIcal from 'node-ical';
import { createEvents } from 'ics';
import { buildFeed, describeRunEvent, foldLine, runEventStatus, uidForRun, type FeedEvent } from '../../src/lib/calendar';
import { utc } from '../helpers/time';

const now = utc('2026-12-01T08:00:05');

// Multi-byte text: ° (2 octets), é (2 octets), ‰ (3 octets), 🥃 (4 octets, a surrogate pair in JS).
const longText =
  'Wash F-12 at 21 °C, café-style fruit wash; low wines ≈ 28 % vol, 🥃🥃🥃 check the 0.5 ‰ loss, then charge Still 2. ' +
  'Ventilation on, no open flame near vapour. Ça va — 🥃 é é é é é é é é é é °°°°°°°°°°°°°°°°°°°°°°°°°°°°°°°°°°°° 🥃🥃🥃🥃🥃🥃🥃🥃🥃';
const trickyText = 'back\\slash; semi, comma\nnext line\r\nand a CRLF';

const events: FeedEvent[] = [
  {
    uid: uidForRun(42, 7),
    start: utc('2026-12-03T06:00'),
    end: utc('2026-12-03T14:00'),
    title: 'Stripping run · Still 1',
    description: longText,
    location: 'Still house, bay 2',
    url: 'https://plateau.example/board?run=42',
    status: 'TENTATIVE',
    sequence: 0,
    lastModified: utc('2026-11-30T17:45'),
  },
  {
    uid: uidForRun(43, 7),
    start: utc('2026-12-03T15:00'),
    end: utc('2026-12-03T21:30'),
    title: 'Spirit run; Still 2, hearts',
    description: trickyText,
    status: 'CONFIRMED',
    sequence: 3,
  },
  {
    uid: uidForRun(44, 7),
    start: utc('2026-12-04T08:00'),
    end: utc('2026-12-04T09:00'),
    title: 'Cleaning · Still 1',
    description: '',
    status: 'CANCELLED',
    sequence: 5,
  },
];

const feed = buildFeed({ name: 'Plateau, all runs; Still house', events, now });
const physicalLines = feed.split('\r\n').slice(0, -1);
const unfold = (text: string) => text.replace(/\r\n[ \t]/g, '');
const logicalLines = unfold(feed).split('\r\n').slice(0, -1);

describe('buildFeed: RFC 5545 / RFC 7986 shape (REFERENCES §8)', () => {
  it('ends every line with CRLF and has no bare CR or LF', () => {
    expect(feed.endsWith('\r\n')).toBe(true);
    expect(feed.replace(/\r\n/g, '')).not.toMatch(/[\r\n]/);
  });

  it('keeps every physical line within 75 octets', () => {
    for (const line of physicalLines) expect(Buffer.byteLength(line, 'utf8')).toBeLessThanOrEqual(75);
    // The fixture really needed folding, including inside multi-byte runs.
    expect(physicalLines.some((l) => l.startsWith(' '))).toBe(true);
  });

  it('never splits a UTF-8 sequence across a fold', () => {
    const bytes = new TextEncoder().encode(feed);
    const strict = new TextDecoder('utf-8', { fatal: true });
    let lineStart = 0;
    for (let i = 0; i + 1 < bytes.length; i++) {
      if (bytes[i] === 0x0d && bytes[i + 1] === 0x0a) {
        // Each physical line on its own must be valid UTF-8.
        expect(() => strict.decode(bytes.subarray(lineStart, i))).not.toThrow();
        lineStart = i + 2;
      }
    }
    for (const line of physicalLines) expect(line).not.toMatch(/[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/);
  });

  it('has VERSION:2.0 and PRODID once, and no METHOD', () => {
    expect(logicalLines.filter((l) => l === 'VERSION:2.0')).toHaveLength(1);
    expect(logicalLines.filter((l) => l.startsWith('PRODID:'))).toHaveLength(1);
    expect(logicalLines.some((l) => l.startsWith('METHOD'))).toBe(false);
    expect(logicalLines[0]).toBe('BEGIN:VCALENDAR');
    expect(logicalLines[logicalLines.length - 1]).toBe('END:VCALENDAR');
  });

  it('names the calendar (NAME, X-WR-CALNAME, escaped) and asks for an hourly refresh', () => {
    expect(logicalLines).toContain('NAME:Plateau\\, all runs\\; Still house');
    expect(logicalLines).toContain('X-WR-CALNAME:Plateau\\, all runs\\; Still house');
    expect(logicalLines).toContain('REFRESH-INTERVAL;VALUE=DURATION:PT1H');
    expect(unfold(buildFeed({ name: 'x', events: [], now, refreshMinutes: 90 }))).toContain('REFRESH-INTERVAL;VALUE=DURATION:PT1H30M\r\n');
  });

  it('writes UTC times with Z, an exclusive DTEND, and DTSTAMP = last revision (RFC 5545 §3.8.7.2, no METHOD), else `now`', () => {
    expect(logicalLines).toContain('DTSTART:20261203T060000Z');
    expect(logicalLines).toContain('DTEND:20261203T140000Z');
    // Event 0 was last revised 30 Nov 17:45; the two others carry no revision time.
    expect(logicalLines.filter((l) => l === 'DTSTAMP:20261130T174500Z')).toHaveLength(1);
    expect(logicalLines.filter((l) => l === 'DTSTAMP:20261201T080005Z')).toHaveLength(2);
    expect(logicalLines.some((l) => l.startsWith('VTIMEZONE') || l.includes('TZID'))).toBe(false);
  });

  it('escapes backslash, semicolon, comma and newlines in TEXT (RFC 5545 §3.3.11)', () => {
    expect(logicalLines).toContain('DESCRIPTION:back\\\\slash\\; semi\\, comma\\nnext line\\nand a CRLF');
    expect(logicalLines).toContain('SUMMARY:Spirit run\\; Still 2\\, hearts');
  });

  it('unfolds back to the original multi-byte text', () => {
    const line = logicalLines.find((l) => l.startsWith('DESCRIPTION:Wash F-12'));
    const value = line!
      .slice('DESCRIPTION:'.length)
      .replace(/\\([\\;,])/g, '$1')
      .replace(/\\n/g, '\n');
    expect(value).toBe(longText);
  });

  it('writes the same event lines as the ics package for the same events', () => {
    const { error, value } = createEvents(
      events.map((e) => ({
        uid: e.uid,
        start: e.start.getTime(),
        startInputType: 'utc' as const,
        startOutputType: 'utc' as const,
        end: e.end.getTime(),
        endInputType: 'utc' as const,
        endOutputType: 'utc' as const,
        title: e.title,
        description: e.description,
        location: e.location,
        url: e.url,
        status: e.status,
        sequence: e.sequence,
        lastModified: e.lastModified?.getTime(),
        timestamp: (e.lastModified ?? now).getTime(),
      })) as Parameters<typeof createEvents>[0],
    );
    expect(error).toBeNull();
    // Property lines of each VEVENT, unfolded and sorted (the two writers order them differently).
    const eventLines = (text: string) => {
      const out: string[][] = [];
      let current: string[] | null = null;
      for (const line of unfold(text).split('\r\n')) {
        if (line === 'BEGIN:VEVENT') current = [];
        else if (line === 'END:VEVENT' && current) {
          out.push(current.sort());
          current = null;
        } else if (current) current.push(line);
      }
      return out;
    };
    const ours = eventLines(feed);
    const theirs = eventLines(value!);
    expect(ours).toHaveLength(3);
    expect(ours).toEqual(theirs);
  });
});

describe('buildFeed: read back by two independent parsers', () => {
  it('ical.js sees every event with its times, text, STATUS and SEQUENCE', () => {
    const calendar = new ICAL.Component(ICAL.parse(feed));
    expect(calendar.getFirstPropertyValue('version')).toBe('2.0');
    const vevents = calendar.getAllSubcomponents('vevent');
    expect(vevents).toHaveLength(3);
    vevents.forEach((component, i) => {
      const event = new ICAL.Event(component);
      expect(event.uid).toBe(events[i].uid);
      expect(event.startDate.toJSDate().getTime()).toBe(events[i].start.getTime());
      expect(event.endDate.toJSDate().getTime()).toBe(events[i].end.getTime());
      expect(event.summary).toBe(events[i].title);
      expect(component.getFirstPropertyValue('status')).toBe(events[i].status);
      expect(Number(component.getFirstPropertyValue('sequence'))).toBe(events[i].sequence);
    });
    expect(new ICAL.Event(vevents[0]).description).toBe(longText);
    expect(new ICAL.Event(vevents[1]).description).toBe('back\\slash; semi, comma\nnext line\nand a CRLF');
  });

  it('node-ical sees the same', () => {
    const parsed = nodeIcal.sync.parseICS(feed);
    const vevents = Object.values(parsed).filter((c) => c?.type === 'VEVENT') as nodeIcal.VEvent[];
    expect(vevents.map((e) => e.uid)).toEqual(events.map((e) => e.uid));
    vevents.forEach((e, i) => {
      expect(new Date(e.start).getTime()).toBe(events[i].start.getTime());
      expect(e.end?.getTime()).toBe(events[i].end.getTime());
      expect(e.status).toBe(events[i].status);
      expect(Number(e.sequence)).toBe(events[i].sequence);
      expect(e.dtstamp?.getTime()).toBe((events[i].lastModified ?? now).getTime());
    });
    expect(vevents[0].description).toBe(longText);
    expect(vevents[0].location).toBe('Still house, bay 2');
  });

  it('refuses an event that ends before it starts, or a negative SEQUENCE', () => {
    const bad = { ...events[0], end: utc('2026-12-03T05:00') };
    expect(() => buildFeed({ name: 'x', events: [bad], now })).toThrow(RangeError);
    expect(() => buildFeed({ name: 'x', events: [{ ...events[0], sequence: -1 }], now })).toThrow(RangeError);
  });
});

describe('foldLine', () => {
  it.each([
    { what: '75 ASCII octets stay whole', line: 'X'.repeat(75), physical: ['X'.repeat(75)] },
    { what: '76 ASCII octets fold to 75 + space-led 1', line: 'X'.repeat(76), physical: ['X'.repeat(75), ' X'] },
    // 74 ASCII + é (2 octets) would be 76: é moves to the next line.
    { what: 'a 2-octet character is not split at the boundary', line: `${'X'.repeat(74)}é`, physical: ['X'.repeat(74), ' é'] },
    // 73 ASCII + 🥃 (4 octets) = 77: the emoji moves whole.
    { what: 'a 4-octet emoji is not split', line: `${'X'.repeat(73)}🥃Y`, physical: ['X'.repeat(73), ' 🥃Y'] },
    // 25 × ‰ (3 octets) = 75 octets exactly.
    { what: 'exactly 75 octets of 3-octet characters stay whole', line: '‰'.repeat(25), physical: ['‰'.repeat(25)] },
  ])('$what', ({ line, physical }) => {
    expect(foldLine(line).split('\r\n')).toEqual(physical);
  });
});

describe('runEventStatus', () => {
  const finished = { status: 'finished' as const, confirmedAt: utc('2026-11-30T12:00') };
  const slowing = { status: 'slowing' as const, confirmedAt: null };
  it.each([
    { what: 'cancelled run', input: { runType: 'stripping', runStatus: 'cancelled', ferments: [finished], feeds: [] }, expected: 'CANCELLED' },
    { what: 'cleaning', input: { runType: 'cleaning', runStatus: 'planned', ferments: [], feeds: [] }, expected: 'CONFIRMED' },
    { what: 'maintenance', input: { runType: 'maintenance', runStatus: 'planned', ferments: [], feeds: [] }, expected: 'CONFIRMED' },
    {
      what: 'stripping run on a wash not yet confirmed',
      input: { runType: 'stripping', runStatus: 'confirmed', ferments: [finished, slowing], feeds: [] },
      expected: 'TENTATIVE',
    },
    {
      what: 'stripping run once every wash is confirmed stable',
      input: { runType: 'stripping', runStatus: 'planned', ferments: [finished, finished], feeds: [] },
      expected: 'CONFIRMED',
    },
    {
      what: '"finished" without confirmation is not enough',
      input: { runType: 'stripping', runStatus: 'planned', ferments: [{ status: 'finished', confirmedAt: null }], feeds: [] },
      expected: 'TENTATIVE',
    },
    { what: 'stripping run with no wash linked', input: { runType: 'stripping', runStatus: 'planned', ferments: [], feeds: [] }, expected: 'TENTATIVE' },
    {
      what: 'spirit run while a feed is tentative',
      input: { runType: 'spirit', runStatus: 'planned', ferments: [], feeds: [{ runStatus: 'done' }, { runStatus: 'planned', eventStatus: 'TENTATIVE' }] },
      expected: 'TENTATIVE',
    },
    {
      what: 'spirit run once feeds are done or confirmed',
      input: { runType: 'spirit', runStatus: 'planned', ferments: [], feeds: [{ runStatus: 'done' }, { runStatus: 'planned', eventStatus: 'CONFIRMED' }] },
      expected: 'CONFIRMED',
    },
    {
      what: 'spirit run with a cancelled feed',
      input: { runType: 'spirit', runStatus: 'planned', ferments: [], feeds: [{ runStatus: 'cancelled', eventStatus: 'CANCELLED' }] },
      expected: 'TENTATIVE',
    },
    {
      what: 'spirit run whose planned feed has no known status',
      input: { runType: 'spirit', runStatus: 'planned', ferments: [], feeds: [{ runStatus: 'planned' }] },
      expected: 'TENTATIVE',
    },
    { what: 'a run already running', input: { runType: 'stripping', runStatus: 'running', ferments: [slowing], feeds: [] }, expected: 'CONFIRMED' },
  ] as const)('$what -> $expected', ({ input, expected }) => {
    expect(runEventStatus({ ...input, ferments: [...input.ferments], feeds: [...input.feeds] })).toBe(expected);
  });
});

describe('uidForRun', () => {
  it('is stable, carries only ids, and takes a host', () => {
    expect(uidForRun(42, 7)).toBe('run-7-42@plateau.invalid');
    expect(uidForRun(42, 7)).toBe(uidForRun(42, 7));
    expect(uidForRun(42, 7, 'Feeds.Example.com')).toBe('run-7-42@feeds.example.com');
    expect(uidForRun(42, 8)).not.toBe(uidForRun(42, 7));
  });
  it.each([
    [1.5, 7, 'x.y'],
    [-1, 7, 'x.y'],
    [1, 7, 'not a host'],
    [1, 7, 'a@b'],
  ])('rejects %s, %s, %s', (run, ws, host) => {
    expect(() => uidForRun(run, ws, host)).toThrow(RangeError);
  });
});

describe('describeRunEvent', () => {
  const text = describeRunEvent({
    runType: 'stripping',
    stillName: 'Still 1',
    ferments: [
      { code: 'F-12', status: 'finished', litres: 900, readyAt: null, readyP10: null, readyP90: null, confirmedAt: utc('2026-11-30T12:00') },
      {
        code: 'F-13',
        status: 'slowing',
        litres: 300,
        readyAt: utc('2026-12-03T12:00'),
        readyP10: utc('2026-12-03T06:00'),
        readyP90: utc('2026-12-04T18:00'),
        confirmedAt: null,
      },
      { code: 'F-9', status: 'slowing', litres: 100, readyAt: null, readyP10: null, readyP90: null, confirmedAt: null, emptiedAt: utc('2026-11-28T09:30') },
    ],
    chargeLitres: 1200,
    operatorName: 'Zoë',
    warnings: [{ severity: 'warning', message: 'Wash F-13 is not confirmed stable: ready window 3 Dec 06:00 – 4 Dec 18:00' }],
    url: 'https://plateau.example/board?run=42',
    timeZone: 'Europe/London',
  });
  it.each([
    'Stripping run on Still 1',
    'Charge: 1,200 L',
    'Wash F-12 (900 L): finished, confirmed stable 30 Nov 12:00',
    'Wash F-13 (300 L): slowing, not yet confirmed stable, ready window 3 Dec 06:00 – 4 Dec 18:00',
    // 28 Nov is in GMT: 09:30 UTC is 09:30 in London.
    'Wash F-9 (100 L): fermenter emptied 28 Nov 09:30',
    'Operator: Zoë',
    '- Warning: Wash F-13 is not confirmed stable: ready window 3 Dec 06:00 – 4 Dec 18:00',
    'Never leave a running still unattended.',
    'On the board: https://plateau.example/board?run=42',
  ])('has the line "%s"', (line) => {
    expect(text.split('\n')).toContain(line);
  });
});
