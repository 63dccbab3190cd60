/** Upload limits, enforced by the server before and while parsing. */
export const MAX_UPLOAD_BYTES = 5 * 1024 * 1024;
export const MAX_UPLOAD_ROWS = 50000;

/** Plausible raw readings and temperatures accepted from a logger file. */
export const RAW_SG_MIN = 0.98;
export const RAW_SG_MAX = 1.2;
export const RAW_DEGREES_MIN = -5;
export const RAW_DEGREES_MAX = 40;
export const SAMPLE_TEMP_MIN_C = -10;
export const SAMPLE_TEMP_MAX_C = 60;

export const LOGGER_CSV_FORMAT_DOC = `## Logger CSV format

One reading per line, with a header line naming the columns. Column order is free,
header names are case-insensitive, and columns not listed here are ignored.

| column | also accepted as | required | content |
|---|---|---|---|
| \`time\` | \`timestamp\`, \`taken_at\`, \`date\` | yes | date and time of the reading (see below) |
| \`value\` | \`reading\`, \`gravity\`, \`sg\` | yes | the reading as the instrument showed it |
| \`unit\` | | no (default \`sg\`) | \`sg\`, \`brix\` (or \`bx\`, \`°bx\`), \`plato\` (or \`°p\`) |
| \`method\` | \`instrument\` | no (default \`digital\`) | \`hydrometer\`, \`refractometer\` or \`digital\` |
| \`temperature\` | \`temp\`, \`sample_temp\` | no | sample temperature in the unit set for the upload (°C or °F) |
| \`temp_c\` | | no | sample temperature in °C |
| \`temp_f\` | | no | sample temperature in °F |

Use at most one temperature column. A digital sensor is taken as
temperature-compensated; a hydrometer reading needs a temperature.

**Separators.** Comma or semicolon, detected from the header line. In a
semicolon-separated file a decimal comma is accepted (\`1,050\` means 1.050);
in a comma-separated file write decimals with a point. Quote fields as in RFC 4180.

**Encoding.** UTF-8, with or without a byte-order mark; CRLF or LF line ends.
Blank lines are skipped.

**Times.** ISO 8601 date and time, \`YYYY-MM-DDTHH:MM\` or \`YYYY-MM-DD HH:MM\`, optionally
with seconds and fractions of a second.
- With a zone (\`Z\`, \`+01:00\`, \`-0500\`) the time is taken as written.
- Without a zone the time is read in the time zone chosen for the upload.
  A time skipped when clocks go forward (for example 01:30 on the last Sunday
  of March in Europe/London) does not exist and the line is rejected. A time
  that occurs twice when clocks go back (01:30 on the last Sunday of October in
  Europe/London) is taken as its first occurrence, still on summer time.
- Day-first or month-first dates such as \`03/11/2026\` are not accepted: they are ambiguous.

**Plausible values.** SG 0.980–1.200; °Brix and °Plato −5 to 40; temperature
−10 to 60 °C. Values must be plain numbers: a cell such as \`=1+1\` or
\`@SUM(A1)\` is rejected as not a number.

**Limits.** At most 5 MB and 50,000 readings per file. Lines that fail a check
are listed with their line number (the header is line 1) and reason; the
other lines are imported.

Example:

\`\`\`
time,value,unit,method,temperature
2026-11-03T14:00:00Z,1.062,sg,hydrometer,21.5
2026-11-03 20:00,1.058,sg,digital,
2026-11-04 08:00,12.4,brix,refractometer,
\`\`\`
`;
