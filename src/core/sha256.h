// SHA-256 digests (OpenSSL libcrypto) as lowercase hex, for content and inputs hashes.
#pragma once

#include <string>
#include <string_view>

namespace alphatrail::core {

// Accumulates bytes and yields their SHA-256 digest.
// Example: Sha256 h; h.update("abc"); h.hex() == "ba7816bf...".
class Sha256 {
 public:
  Sha256();
  ~Sha256();
  Sha256(const Sha256&) = delete;
  Sha256& operator=(const Sha256&) = delete;
  // Adds bytes to the digest.
  void update(std::string_view bytes);
  // Finishes the digest and returns it as 64 lowercase hex digits; call once.
  std::string hex();

 private:
  void* context_;
};

// Returns the SHA-256 of bytes as 64 lowercase hex digits.
std::string sha256_hex(std::string_view bytes);

}  // namespace alphatrail::core
