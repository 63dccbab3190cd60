/** RFC 5545 content-line helpers: TEXT escaping (§3.3.11) and folding at 75 octets (§3.1). */

const MAX_OCTETS = 75;

// RFC 5545 TEXT forbids these control characters: matching them is the point.
// eslint-disable-next-line no-control-regex
const NEEDS_ESCAPE = /[\\;,\u0000-\u0008\u000A-\u001F\u007F]/;
// eslint-disable-next-line no-control-regex
const ESCAPABLE = /\r\n?|[\\;,\n]|[\u0000-\u0008\u000B-\u001F\u007F]/g;

function escapeChar(match: string): string {
  switch (match) {
    case '\\':
      return '\\\\';
    case ';':
      return '\\;';
    case ',':
      return '\\,';
    case '\n':
    case '\r':
    case '\r\n':
      return '\\n';
    default:
      return ''; // control characters TEXT may not carry
  }
}

/**
 * Escape a TEXT value: backslash, semicolon, comma, and any newline (CRLF,
 * CR or LF) as \n. Control characters other than HTAB are dropped.
 */
export function escapeText(text: string): string {
  return NEEDS_ESCAPE.test(text) ? text.replace(ESCAPABLE, escapeChar) : text;
}

/** Newlines to \n, and control characters RFC 5545 does not allow in TEXT (all but HTAB and newline) removed. */
export function normaliseText(text: string): string {
  // eslint-disable-next-line no-control-regex
  return text.replace(/\r\n?/g, '\n').replace(/[\u0000-\u0008\u000B-\u001F\u007F]/g, '');
}

/**
 * Fold one content line so no physical line exceeds 75 octets (CRLF not
 * counted): breaks go between whole code points — a UTF-8 sequence is never
 * split — and each continuation starts with a single space.
 */
export function foldLine(line: string): string {
  // Each UTF-16 code unit encodes to at most 3 octets.
  if (line.length * 3 <= MAX_OCTETS) return line;
  const parts: string[] = [];
  let segmentStart = 0;
  let octets = 0;
  for (let i = 0; i < line.length;) {
    const unit = line.charCodeAt(i);
    let units = 1;
    let n: number;
    if (unit < 0x80) n = 1;
    else if (unit < 0x800) n = 2;
    else if (unit >= 0xd800 && unit <= 0xdbff && i + 1 < line.length) {
      const next = line.charCodeAt(i + 1);
      if (next >= 0xdc00 && next <= 0xdfff) {
        n = 4;
        units = 2;
      } else n = 3; // a lone surrogate is written as U+FFFD, 3 octets
    } else n = 3;
    if (octets + n > MAX_OCTETS) {
      parts.push(line.slice(segmentStart, i));
      segmentStart = i;
      octets = 1; // the leading space of the continuation
    }
    octets += n;
    i += units;
  }
  if (parts.length === 0) return line;
  parts.push(line.slice(segmentStart));
  return parts.join('\r\n ');
}

/** Undo folding: remove every CRLF followed by one space or tab. */
export function unfold(text: string): string {
  return text.replace(/\r\n[ \t]/g, '');
}

/** A duration in minutes as an RFC 5545 DURATION value: 60 -> PT1H, 90 -> PT1H30M, 1440 -> P1D. */
export function formatDurationMinutes(minutes: number): string {
  if (!Number.isInteger(minutes) || minutes <= 0) throw new RangeError('Duration must be a whole number of minutes above zero');
  const days = Math.floor(minutes / 1440);
  const hours = Math.floor((minutes % 1440) / 60);
  const mins = minutes % 60;
  const time = `${hours ? `${hours}H` : ''}${mins ? `${mins}M` : ''}`;
  return `P${days ? `${days}D` : ''}${time ? `T${time}` : ''}`;
}
