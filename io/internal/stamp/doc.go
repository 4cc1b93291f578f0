// Package stamp reads timestamps written as text: RFC 3339 / ISO 8601 date-times with or without a
// UTC offset, a date and a time of day held in two columns, strftime layouts, and Unix epoch numbers.
//
// A parsed value is a Stamp: the wall clock as written, plus the UTC offset when the text carried one.
// Turning an offset-less wall clock into an instant needs a time zone, which is package zone's job.
//
// The parsers are written by hand (no time.Parse): NewParser compiles its Options once, the Parser is
// immutable afterwards and safe for concurrent use, and a successful parse does not allocate. Leading
// and trailing spaces, tabs and line ends around a value are ignored in every form.
//
// # Automatic forms (Options zero)
//
// Parse reads
//
//	2024-06-21T18:30:00Z            RFC 3339: T, t or a space between date and time;
//	2024-06-21 18:30:00.250+02:00   optional seconds; fraction after the seconds with . or ,
//	2024-06-21T18:30-0530           (digits past the ninth are dropped, not rounded);
//	2024-06-21T18:30:00+09          offset Z, z, ±hh:mm, ±hhmm or ±hh (hours ≤ 23, minutes ≤ 59)
//	2024-06-21 18:30:00 UTC         UTC or GMT, after an optional space (database exports)
//	2024-03-10 02:30                ISO local date-time: no offset, a zone decides the instant
//	20240621T183000Z                ISO 8601 basic form (with T only)
//
// and refuses a date alone (ErrDateOnly), single-digit fields, hour 24, leap seconds (second 60),
// years outside 1..9999 and days that do not exist (31 June, 29 February of a common year).
//
// ParseDateTime reads a date column as yyyy-mm-dd (a midnight time after it, as spreadsheets write
// date columns, is ignored; any other time there is an error) and a time-of-day column as H:MM,
// HH:MM, HH:MM:SS(.fff), HMM, HHMM or HHMMSS, with an optional AM/PM marker in any case, with or
// without a space or dots ("7:30 PM", "0730pm", "12:05 a.m.", "7 PM"), or, without a marker, a UTC
// offset ("18:30Z"). One or two digits alone ("30") are refused as ambiguous.
//
// # Layouts (Options.Layout, --time-format)
//
//	%Y  year, exactly 4 digits            %y  year, 2 digits: 69..99 → 1969..1999, 00..68 → 2000..2068
//	%m  month, 1 or 2 digits              %b %B  English month name, full or 3-letter, or "Sept"; any case
//	%d  day, 1 or 2 digits                %e  as %d, leading spaces allowed
//	%j  day of the year, 1 to 3 digits    %a %A  English weekday name, full or 3-letter; checked against the date
//	%H  hour 0..23, 1 or 2 digits         %I  hour 1..12, 1 or 2 digits (needs %p)
//	%M  minute, 1 or 2 digits             %S  second, 1 or 2 digits
//	%f  fraction of a second, 1 or more digits (past the ninth dropped; needs %S)
//	%p  AM or PM, any case, with or without dots
//	%z  Z, ±hh:mm, ±hhmm or ±hh           %Z  UTC or GMT only (other abbreviations are ambiguous: ErrZoneName)
//	%T  %H:%M:%S    %R  %H:%M    %F  %Y-%m-%d    %D  %m/%d/%y
//	%n %t, and any white space in the layout: zero or more spaces or tabs
//	%%  a literal %
//
// Other bytes match themselves. Numeric directives written together with nothing between them
// (%Y%m%d, %H%M) share a run of digits: every directive but the first takes its full width and the
// first takes the rest, so %H%M reads 0730 and 730 alike. NewParser refuses an unknown directive
// (naming it and listing these), a field given twice, %I without %p, %H with %p, %j with a month or
// day, %f without %S or inside a digit run, and a date or time of day left incomplete (a date needs a
// year with month and day, or a day of the year; a time of day needs an hour).
//
// Parse needs a layout with both a date and a time of day (CheckParse says so up front).
// ParseDateTime applies the layout where it fits: a date-only layout reads the date column (the time
// of day is read automatically), a time-only layout reads the time-of-day column (the date is ISO),
// and a layout with both is split between its date and time-of-day directives, each part reading its
// column (CheckParseDateTime refuses a layout that interleaves them).
//
// # Epochs (Options.Epoch, --epoch)
//
// Numbers are Unix time in s, ms, us or ns: an optional sign, digits, an optional fraction ("-1.5",
// "1718994600123.25"; digits finer than a nanosecond are dropped). The stamp is in UTC (HasOffset, Offset
// 0). A number outside years 1..9999 is ErrRange, with a hint when it would fit a finer unit
// ("use --epoch ms"). In ns, the most negative int64 (-9223372036854775808) is refused as out of range.
//
// # Errors
//
// Every error is an *Error: the input (cut to 64 bytes in the message), what is wrong and what would
// be valid, e.g. `"2024-13-01 10:00": month 13 out of range [1, 12]`, and a sentinel cause (ErrEmpty,
// ErrSyntax, ErrRange, ErrDateOnly, ErrZoneName, ErrLayout) for errors.Is.
package stamp
