// ISO 8601 date-times as gauge and observed records write them, read into seconds since the
// Unix epoch (1970-01-01T00:00:00Z, UTC, leap seconds not counted, as POSIX time is).
//
// Accepted (ISO 8601-1:2019, calendar date and time of day, extended or basic time):
//   2026-05-14T06:30:00Z   2026-05-14T06:30:00+01:00   2026-05-14 06:30   2026-05-14T06:30:00.5
//   2026-05-14T0630+0100   2026-05-14 (midnight)
// A date-time with no zone designator is local time: the caller's `default_offset_min`
// (the study's time_zone) says how far it is ahead of UTC.
//
//   auto t = io::parse_iso_date_time("2026-05-14T06:30:00+01:00", 0, &why);  // 1778736600 s
#pragma once

#include <optional>
#include <string>
#include <string_view>

namespace freshet::io {

// Seconds since the epoch (UTC) of `text`, or nullopt with the reason in `why` (when given):
// a malformed field, a month 13, a 31 April, an hour 24 or a minute 60 are refused.
std::optional<double> parse_iso_date_time(std::string_view text, int default_offset_min,
                                          std::string* why = nullptr);

// A UTC offset as a study states it: "Z" or "UTC" (0), "+01:00", "-05:30", "+0100", "+01".
// Minutes ahead of UTC, or nullopt; |offset| must be at most 14 h (ISO 8601 allows any, the
// world's zones span -12 h to +14 h).
std::optional<int> parse_utc_offset(std::string_view text);

}  // namespace freshet::io
