// SHA-256 of a byte string, as lower-case hex: the fingerprint of an input file that a run's
// report records, so a reviewer can tell which version of the basin file produced it.
// FIPS 180-4 (NIST 2015), Secure Hash Standard, section 6.2.
//
//   std::string h = freshet::sha256_hex("abc");
//   // "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
#pragma once

#include <string>
#include <string_view>

namespace freshet {

std::string sha256_hex(std::string_view bytes);

}  // namespace freshet
