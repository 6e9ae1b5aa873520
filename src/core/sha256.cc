#include "core/sha256.h"

#include <openssl/evp.h>

#include <array>
#include <stdexcept>

namespace alphatrail::core {

Sha256::Sha256() : context_(EVP_MD_CTX_new()) {
  if (context_ == nullptr ||
      EVP_DigestInit_ex(static_cast<EVP_MD_CTX*>(context_), EVP_sha256(), nullptr) != 1)
    throw std::runtime_error("cannot initialise SHA-256");
}

Sha256::~Sha256() {
  EVP_MD_CTX_free(static_cast<EVP_MD_CTX*>(context_));
}

void Sha256::update(std::string_view bytes) {
  EVP_DigestUpdate(static_cast<EVP_MD_CTX*>(context_), bytes.data(), bytes.size());
}

std::string Sha256::hex() {
  std::array<unsigned char, EVP_MAX_MD_SIZE> digest{};
  unsigned int size = 0;
  EVP_DigestFinal_ex(static_cast<EVP_MD_CTX*>(context_), digest.data(), &size);
  static constexpr char kHex[] = "0123456789abcdef";
  std::string text;
  text.reserve(static_cast<std::size_t>(size) * 2);
  for (unsigned int i = 0; i < size; ++i) {
    text.push_back(kHex[digest[i] >> 4]);
    text.push_back(kHex[digest[i] & 15]);
  }
  return text;
}

std::string sha256_hex(std::string_view bytes) {
  Sha256 h;
  h.update(bytes);
  return h.hex();
}

}  // namespace alphatrail::core
