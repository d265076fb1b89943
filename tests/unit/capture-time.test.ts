import { describe, expect, it } from 'vitest';
import { readCaptureTime, showCaptureTime } from '../../shared/capture/capture-time';

/**
 * Offsets from the IANA tz database (zone files "europe", "northamerica", "asia"): Europe/Berlin is UTC+01:00 in
 * winter and +02:00 from the last Sunday of March (EU Directive 2000/84/EC; 2026-03-29 at 01:00 UTC);
 * America/New_York is −05:00 / −04:00 from the second Sunday of March (US Energy Policy Act 2005; 2026-03-08);
 * Asia/Kolkata is +05:30 all year. ISO 8601 writes the offset as ±hh:mm, and Z for UTC.
 */
const NOW = new Date('2026-05-01T12:00:00Z');

function read(text: string, zone = 'Europe/Berlin') {
  return readCaptureTime(text, zone, NOW);
}

describe('reading a typed capture time', () => {
  it("keeps the picker's own format as the wall clock in the chosen zone", () => {
    expect(read('2026-04-07 09:15')).toEqual({
      kind: 'time',
      iso: '2026-04-07T09:15:00+02:00',
      shown: '2026-04-07 09:15',
      dateOnly: false,
    });
    expect(read('2026-02-07 09:15')).toMatchObject({ iso: '2026-02-07T09:15:00+01:00' });
    expect(read('2026-04-07 09:15', 'America/New_York')).toMatchObject({ iso: '2026-04-07T09:15:00-04:00' });
    expect(read('2026-04-07 09:15', 'Asia/Kolkata')).toMatchObject({ iso: '2026-04-07T09:15:00+05:30' });
    expect(read('2026-04-07 09:15', 'UTC')).toMatchObject({ iso: '2026-04-07T09:15:00Z' });
  });

  it('takes a date alone as midnight and says it was a date alone', () => {
    expect(read('2026-04-07')).toEqual({
      kind: 'time',
      iso: '2026-04-07T00:00:00+02:00',
      shown: '2026-04-07 00:00',
      dateOnly: true,
    });
  });

  it('reads other common ways of writing the same moment', () => {
    for (const text of [
      '2026-04-07T09:15',
      '2026-04-07 09:15:00',
      '2026/04/07 09:15',
      '2026-04-07 9:15',
      '7 Apr 2026 09:15',
      'April 7, 2026 9:15 AM',
      '  2026-04-07   09:15 ',
    ]) {
      expect(read(text), text).toMatchObject({ kind: 'time', iso: '2026-04-07T09:15:00+02:00' });
    }
  });

  it('keeps a zone written in the text and shows it in the chosen zone', () => {
    expect(read('2026-04-07T07:15:00Z')).toMatchObject({ iso: '2026-04-07T09:15:00+02:00', shown: '2026-04-07 09:15' });
    expect(read('2026-04-07T09:15:00-04:00')).toMatchObject({ iso: '2026-04-07T15:15:00+02:00' });
  });

  it('refuses what it cannot read, with a message that shows the form it wants', () => {
    expect(read('next tuesday')).toMatchObject({
      kind: 'refused',
      message: expect.stringContaining('2026-04-07 09:15'),
    });
    expect(read('2026-02-30 10:00')).toMatchObject({ kind: 'refused' });
    expect(read('2026-04-07 25:10')).toMatchObject({ kind: 'refused' });
    expect(read('07/04/2026 09:15')).toMatchObject({ kind: 'refused', message: expect.stringMatching(/day-first/) });
  });

  it('refuses a wall-clock time that the spring clock change skipped', () => {
    // 2026-03-29 in Berlin: 02:00 CET became 03:00 CEST, so 02:30 never happened there (EU Directive 2000/84/EC).
    expect(read('2026-03-29 02:30')).toMatchObject({ kind: 'refused', message: expect.stringMatching(/clocks/) });
    expect(read('2026-03-29 03:30')).toMatchObject({ iso: '2026-03-29T03:30:00+02:00' });
  });

  it('refuses times in the future and unknown zones, and reads blank as no time', () => {
    expect(read('2027-01-01 10:00')).toMatchObject({ kind: 'refused', message: expect.stringMatching(/future/) });
    expect(read('2026-04-07 09:15', 'Mars/Olympus')).toMatchObject({ kind: 'refused' });
    expect(read('   ')).toEqual({ kind: 'empty' });
  });

  it('shows a stored instant as the wall clock of the zone it is viewed in', () => {
    // The clip page's reported value: 2026-04-06T10:15:00.000Z.
    expect(showCaptureTime('2026-04-06T10:15:00.000Z', 'Europe/Berlin')).toBe('2026-04-06 12:15');
    expect(showCaptureTime('2026-04-06T10:15:00.000Z', 'America/New_York')).toBe('2026-04-06 06:15');
    expect(showCaptureTime('2026-04-06T10:15:00.000Z', 'UTC')).toBe('2026-04-06 10:15');
  });
});
