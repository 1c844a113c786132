#include "freshet/io/iso_time.hpp"

#include <chrono>
#include <cmath>

namespace freshet::io {

namespace {

// Reads exactly `n` digits at `pos`, advancing it.
std::optional<int> digits(std::string_view s, std::size_t& pos, std::size_t n) {
  if (pos + n > s.size()) return std::nullopt;
  int v = 0;
  for (std::size_t k = 0; k < n; ++k) {
    const char c = s[pos + k];
    if (c < '0' || c > '9') return std::nullopt;
    v = v * 10 + (c - '0');
  }
  pos += n;
  return v;
}

bool fail(std::string* why, std::string message) {
  if (why) *why = std::move(message);
  return false;
}

constexpr std::string_view kForm = "expected an ISO 8601 date-time such as 2026-05-14T06:30:00, "
                                   "2026-05-14 06:30 or 2026-05-14T06:30:00+01:00";

struct Clock {
  int hour = 0, minute = 0;
  double second = 0.0;
};

// hh:mm[:ss[.f]] or hhmm[ss[.f]] at `pos`.
bool read_time(std::string_view s, std::size_t& pos, Clock& c, std::string* why) {
  const auto h = digits(s, pos, 2);
  if (!h) return fail(why, std::string(kForm));
  const bool extended = pos < s.size() && s[pos] == ':';
  if (extended) ++pos;
  const auto m = digits(s, pos, 2);
  if (!m) return fail(why, std::string(kForm));
  c.hour = *h;
  c.minute = *m;
  const bool has_seconds = extended ? (pos < s.size() && s[pos] == ':')
                                    : (pos < s.size() && s[pos] >= '0' && s[pos] <= '9');
  if (has_seconds) {
    if (extended) ++pos;
    const auto sec = digits(s, pos, 2);
    if (!sec) return fail(why, std::string(kForm));
    c.second = *sec;
    if (pos < s.size() && (s[pos] == '.' || s[pos] == ',')) {  // decimal fraction of a second
      ++pos;
      double scale = 0.1;
      const std::size_t first = pos;
      while (pos < s.size() && s[pos] >= '0' && s[pos] <= '9') {
        c.second += scale * (s[pos++] - '0');
        scale /= 10.0;
      }
      if (pos == first) return fail(why, std::string(kForm));
    }
  }
  if (c.hour > 23) return fail(why, "hour " + std::to_string(c.hour) + " is not 00 to 23");
  if (c.minute > 59) return fail(why, "minute " + std::to_string(c.minute) + " is not 00 to 59");
  if (c.second >= 60.0) {
    return fail(why, "second " + std::to_string(static_cast<int>(c.second)) +
                         " is not 00 to 59 (leap seconds are not counted)");
  }
  return true;
}

}  // namespace

std::optional<int> parse_utc_offset(std::string_view s) {
  if (s == "Z" || s == "z" || s == "UTC") return 0;
  if (s.size() < 3 || (s[0] != '+' && s[0] != '-')) return std::nullopt;
  std::size_t pos = 1;
  const auto h = digits(s, pos, 2);
  if (!h) return std::nullopt;
  int m = 0;
  if (pos < s.size()) {
    if (s[pos] == ':') ++pos;
    const auto mm = digits(s, pos, 2);
    if (!mm || *mm > 59) return std::nullopt;
    m = *mm;
  }
  if (pos != s.size()) return std::nullopt;
  const int minutes = *h * 60 + m;
  if (minutes > 14 * 60) return std::nullopt;
  return s[0] == '-' ? -minutes : minutes;
}

std::optional<double> parse_iso_date_time(std::string_view s, int default_offset_min,
                                          std::string* why) {
  std::size_t pos = 0;
  const auto y = digits(s, pos, 4);
  const bool dash1 = pos < s.size() && s[pos] == '-';
  if (dash1) ++pos;
  const auto mo = y && dash1 ? digits(s, pos, 2) : std::nullopt;
  const bool dash2 = pos < s.size() && s[pos] == '-';
  if (dash2) ++pos;
  const auto d = mo && dash2 ? digits(s, pos, 2) : std::nullopt;
  if (!d) {
    fail(why, std::string(kForm));
    return std::nullopt;
  }
  using namespace std::chrono;
  const year_month_day date{year{*y}, month{static_cast<unsigned>(*mo)},
                            day{static_cast<unsigned>(*d)}};
  if (!date.ok()) {
    fail(why, "no such date: " + std::string(s.substr(0, 10)));
    return std::nullopt;
  }
  Clock c;
  if (pos < s.size() && (s[pos] == 'T' || s[pos] == 't' || s[pos] == ' ')) {
    ++pos;
    if (!read_time(s, pos, c, why)) return std::nullopt;
  }
  int offset_min = default_offset_min;
  if (pos < s.size()) {
    const auto zone = parse_utc_offset(s.substr(pos));
    if (!zone) {
      fail(why, "'" + std::string(s.substr(pos)) + "' is not a zone designator (Z, +hh:mm, "
                "-hh:mm, +hhmm or +hh)");
      return std::nullopt;
    }
    offset_min = *zone;
  }
  const auto days_since_epoch = static_cast<double>(sys_days{date}.time_since_epoch().count());
  return days_since_epoch * 86400.0 + c.hour * 3600.0 + c.minute * 60.0 + c.second -
         offset_min * 60.0;
}

}  // namespace freshet::io
