import { TZDate, tz } from '@date-fns/tz';
import { format, isValid, parse, parseISO } from 'date-fns';

/** What a typed capture time means: nothing, an instant in the chosen zone, or a reason it was refused. */
export type CaptureTimeReading =
  | { kind: 'empty' }
  | { kind: 'time'; iso: string; shown: string; dateOnly: boolean }
  | { kind: 'refused'; message: string };

/** How a capture time is written back in the form: the picker's own format. */
export const CAPTURE_TIME_FORMAT = 'yyyy-MM-dd HH:mm';

/** Wall-clock forms an operator is likely to type, most specific first (date-fns `parse` tokens). */
const DATE_TIME_FORMS = [
  'yyyy-MM-dd HH:mm:ss',
  "yyyy-MM-dd'T'HH:mm:ss",
  'yyyy-MM-dd HH:mm',
  "yyyy-MM-dd'T'HH:mm",
  'yyyy-MM-dd h:mm a',
  'yyyy/MM/dd HH:mm',
  'yyyy.MM.dd HH:mm',
  'd MMM yyyy HH:mm',
  'd MMMM yyyy HH:mm',
  'MMM d, yyyy HH:mm',
  'MMMM d, yyyy HH:mm',
  'MMM d, yyyy h:mm a',
  'MMMM d, yyyy h:mm a',
];
const DATE_FORMS = [
  'yyyy-MM-dd',
  'yyyy/MM/dd',
  'yyyy.MM.dd',
  'd MMM yyyy',
  'd MMMM yyyy',
  'MMM d, yyyy',
  'MMMM d, yyyy',
];

/** A time that carries its own zone: ISO 8601 with `Z` or a ±hh:mm offset. */
const ISO_WITH_ZONE = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})$/i;
/** 07/04/2026 or 4/7/26: day-first in some places, month-first in others. */
const SLASHED_DAY_MONTH = /^\d{1,2}[/.-]\d{1,2}[/.-]\d{2,4}\b/;

/** How far ahead of the reading's clock a capture time may be before it is taken for a typing error. */
const FUTURE_SLACK_MS = 24 * 3600_000;
const EARLIEST_YEAR = 1970;

export function isKnownTimeZone(zone: string): boolean {
  try {
    new Intl.DateTimeFormat('en', { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}

/** The typed wall clock, read in UTC so that the browser's own clock changes cannot shift it. */
function firstMatch(text: string, forms: string[]): { date: Date; form: string } | null {
  const reference = new Date(Date.UTC(2000, 0, 1));
  for (const form of forms) {
    const date = parse(text, form, reference, { in: tz('UTC') });
    if (isValid(date)) return { date, form };
  }
  return null;
}

/** The instant a wall-clock reading names in `zone`, with the offset written out (ISO 8601). */
function inZone(wall: Date, zone: string): TZDate {
  return new TZDate(
    wall.getFullYear(),
    wall.getMonth(),
    wall.getDate(),
    wall.getHours(),
    wall.getMinutes(),
    wall.getSeconds(),
    zone,
  );
}

/**
 * Reads a capture time typed in the form. A time without a zone is the wall clock in `zone` (an IANA name such as
 * "Europe/Berlin"); a time with `Z` or an offset keeps its own. A date alone is taken as midnight and says so.
 */
export function readCaptureTime(typed: string, zone: string, now = new Date()): CaptureTimeReading {
  const text = typed.trim().replace(/\s+/g, ' ');
  if (text === '') return { kind: 'empty' };
  if (!isKnownTimeZone(zone)) return { kind: 'refused', message: `"${zone}" is not a time zone this browser knows.` };

  let instant: TZDate;
  let dateOnly = false;
  if (ISO_WITH_ZONE.test(text)) {
    const parsed = parseISO(text);
    if (!isValid(parsed)) return { kind: 'refused', message: `"${text}" is not a real date and time.` };
    instant = new TZDate(parsed.getTime(), zone);
  } else {
    const withTime = firstMatch(text, DATE_TIME_FORMS);
    const dateAlone = withTime ? null : firstMatch(text, DATE_FORMS);
    const wall = withTime?.date ?? dateAlone?.date;
    if (!wall) {
      const message = SLASHED_DAY_MONTH.test(text)
        ? `"${text}" could be read day-first or month-first: write it as year-month-day, e.g. 2026-04-07 09:15.`
        : `"${text}" is not a date and time Kinefold can read: write it as year-month-day and 24-hour time, ` +
          'e.g. 2026-04-07 09:15.';
      return { kind: 'refused', message };
    }
    dateOnly = dateAlone !== null;
    instant = inZone(wall, zone);
    // A time skipped when the clocks went forward comes back shifted by an hour: it never happened in that zone.
    if (format(instant, 'HH:mm') !== format(wall, 'HH:mm')) {
      return {
        kind: 'refused',
        message: `${format(wall, CAPTURE_TIME_FORMAT)} did not happen in ${zone}: the clocks went forward that night.`,
      };
    }
  }
  if (instant.getFullYear() < EARLIEST_YEAR) {
    return { kind: 'refused', message: `${format(instant, 'yyyy')} is too early for a capture time.` };
  }
  if (instant.getTime() > now.getTime() + FUTURE_SLACK_MS) {
    return { kind: 'refused', message: `${format(instant, CAPTURE_TIME_FORMAT)} is in the future.` };
  }
  return {
    kind: 'time',
    iso: format(instant, "yyyy-MM-dd'T'HH:mm:ssXXX"),
    shown: format(instant, CAPTURE_TIME_FORMAT),
    dateOnly,
  };
}

/** A stored capture time as the wall clock in `zone`, in the form's own format. */
export function showCaptureTime(iso: string, zone: string): string {
  return format(new TZDate(new Date(iso).getTime(), zone), CAPTURE_TIME_FORMAT);
}

/** The browser's own zone, the form's default. */
export function browserTimeZone(): string {
  return Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC';
}
