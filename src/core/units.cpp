#include "freshet/core/units.hpp"

namespace freshet::units {

std::optional<System> parse_system(std::string_view text) {
  if (text == "si") return System::si;
  if (text == "us") return System::us_customary;
  return std::nullopt;
}

std::string_view to_string(System s) { return s == System::si ? "si" : "us"; }

}  // namespace freshet::units
