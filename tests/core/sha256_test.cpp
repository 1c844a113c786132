// SHA-256 against the published examples: NIST (2015), FIPS 180-4 Secure Hash Standard, and
// the example values NIST publishes with it (Examples with Intermediate Values, SHA256.pdf):
// "abc", the 448-bit two-block message, and one million 'a' (FIPS 180-2, 2002, Appendix B.3).
// The empty message's digest is the value listed for the empty input in NIST's SHA test
// vectors (CAVP SHA256ShortMsg.rsp, Len = 0).
#include <gtest/gtest.h>

#include <string>
#include <utility>

#include "freshet/core/sha256.hpp"

namespace freshet {
namespace {

TEST(Sha256, MatchesTheFipsExamples) {
  EXPECT_EQ(sha256_hex("abc"),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  EXPECT_EQ(sha256_hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq"),
            "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
  EXPECT_EQ(sha256_hex(std::string(1000000, 'a')),
            "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
}

TEST(Sha256, EmptyMessage) {
  EXPECT_EQ(sha256_hex(""), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
}

// Lengths around the padding boundary (55 bytes fit one final block, 56 need two; 64 and 120
// likewise at the next block): digests from Python's hashlib (OpenSSL), the reference library,
// hashlib.sha256(b"x" * n).hexdigest().
TEST(Sha256, PaddingBoundariesMatchTheReferenceLibrary) {
  const std::pair<int, const char*> cases[] = {
      {55, "d5e285683cd4efc02d021a5c62014694958901005d6f71e89e0989fac77e4072"},
      {56, "04c26261370ee7541549d16dee320c723e3fd14671e66a099afe0a377c16888e"},
      {63, "75220b47218278e656f2013bb8f0c455a25eaf01e86c64924e9d48d89776d6f2"},
      {64, "7ce100971f64e7001e8fe5a51973ecdfe1ced42befe7ee8d5fd6219506b5393c"},
      {65, "9537c5fdf120482f7d58d25e9ed583f52c02b4e304ea814db1633ad565aed7e9"},
      {119, "000b48d4edf0fa7bee3c6236ecd2785baa5db4eeb8bb54341b029e0d9fa5fb0c"},
      {120, "13f05a0b594787f5ecd315edc96141bd3243203d1b7d4f0836f37308b276ba98"}};
  for (const auto& [n, digest] : cases) {
    EXPECT_EQ(sha256_hex(std::string(static_cast<std::size_t>(n), 'x')), digest) << n << " bytes";
  }
}

}  // namespace
}  // namespace freshet
