// Content hashes of a test's inputs, so the batch history can tell a re-run of the same test (same bytes) from a
// new batch.
//
// The hash is SHA-256 (NIST FIPS 180-4, "Secure Hash Standard", 2015), computed by GNU Nettle (Debian's
// nettle-dev); tests check it against the FIPS 180-4 example messages. A 256-bit hash makes an accidental
// collision between two different tests practically impossible, which a 64-bit hash over years of batches would
// not quite promise.
//
// What is hashed (input_hash): for each file in order, its length in bytes (8 bytes, big-endian) and then its
// bytes. The length prefix makes the boundaries part of the hash, so moving a byte from the TOML file into the
// readings file changes it. Only contents count, not names: the same test copied to another folder hashes the same.
#pragma once

#include <nettle/sha2.h>

#include <array>
#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

#include "src/io/description_file.hpp"

namespace spreadfit::history {

/// Incremental SHA-256 (FIPS 180-4, section 6.2; Nettle's sha256_ctx). Feed bytes with update() in any pieces, then
/// call digest() once; the result does not depend on how the bytes were split.
class Sha256 {
 public:
  Sha256();
  void update(std::string_view bytes);
  /// The 32-byte digest. Pads and finishes the message: call once; later update() or digest() calls throw
  /// std::logic_error.
  std::array<std::uint8_t, 32> digest();

 private:
  sha256_ctx context_{};
  bool finished_ = false;
};

/// Lower-case hexadecimal, two digits a byte.
std::string to_hex(const std::array<std::uint8_t, 32>& digest);

/// SHA-256 of `bytes` as 64 lower-case hex digits.
std::string sha256_hex(std::string_view bytes);

/// The hash of files' contents, each length-prefixed as described above, as 64 lower-case hex digits.
/// Throws io::InputError naming a file that cannot be opened or read.
std::string input_hash(const std::vector<std::filesystem::path>& files);

/// The files a test was read from: its TOML file, then each readings file in the order listed (none for a
/// final-only test).
std::vector<std::filesystem::path> input_files(const io::TestDescription& test);

/// The hash of one test's inputs: input_hash(input_files(test)).
std::string input_hash(const io::TestDescription& test);

/// The hash of several tests fitted together (one material): with one test, that test's hash; with more, the
/// SHA-256 of their hashes sorted, so the order the tests were named in does not matter.
std::string input_hash(const std::vector<io::TestDescription>& tests);

}  // namespace spreadfit::history
