#include "core/sha256.h"

#include <gtest/gtest.h>

namespace alphatrail::core {
namespace {

// Test vectors from FIPS 180-2, Appendix B (SHA-256 of "abc" and of the 448-bit message).
TEST(Sha256, MatchesFips180Vectors) {
  EXPECT_EQ(sha256_hex("abc"), "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  EXPECT_EQ(sha256_hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq"),
            "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
}

TEST(Sha256, StreamsLikeOneShot) {
  Sha256 h;
  h.update("ab");
  h.update("c");
  EXPECT_EQ(h.hex(), sha256_hex("abc"));
}

}  // namespace
}  // namespace alphatrail::core
