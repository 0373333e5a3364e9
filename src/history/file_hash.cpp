#include "src/history/file_hash.hpp"

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <fstream>
#include <stdexcept>
#include <system_error>

#include "src/io/input_error.hpp"

namespace spreadfit::history {

namespace {

/// Bytes read from a file per step while hashing it.
constexpr std::size_t kChunk = std::size_t{1} << 16;

/// Hashes `file` into `hash` (length prefix, then contents). Throws InputError naming the file.
void hash_file(Sha256& hash, const std::filesystem::path& file) {
  std::error_code ec;
  const auto size = std::filesystem::file_size(file, ec);
  if (ec)
    throw io::InputError(file.string(), 0, "",
                         "cannot read the file to hash it for the batch history: " + ec.message());
  std::ifstream in(file, std::ios::binary);
  if (!in)
    throw io::InputError(file.string(), 0, "",
                         "cannot open the file to hash it for the batch history: " + std::string(std::strerror(errno)));
  std::array<char, 8> prefix{};
  for (int i = 0; i < 8; ++i) prefix[std::size_t(i)] = static_cast<char>((std::uint64_t(size) >> (56 - 8 * i)) & 0xff);
  hash.update(std::string_view(prefix.data(), prefix.size()));
  std::string chunk(kChunk, '\0');
  std::uintmax_t total = 0;
  while (in) {
    in.read(chunk.data(), static_cast<std::streamsize>(chunk.size()));
    const auto got = static_cast<std::size_t>(in.gcount());
    hash.update(std::string_view(chunk.data(), got));
    total += got;
  }
  if (in.bad() || total != size)
    throw io::InputError(file.string(), 0, "",
                         "cannot read the file to hash it for the batch history (read " + std::to_string(total) +
                             " of " + std::to_string(size) + " bytes; was it changed while spreadfit ran?)");
}

}  // namespace

Sha256::Sha256() { sha256_init(&context_); }

void Sha256::update(std::string_view bytes) {
  if (finished_) throw std::logic_error("Sha256::update after digest()");
  sha256_update(&context_, bytes.size(), reinterpret_cast<const std::uint8_t*>(bytes.data()));
}

std::array<std::uint8_t, 32> Sha256::digest() {
  if (finished_) throw std::logic_error("Sha256::digest called twice");
  // Nettle pads the message (FIPS 180-4 section 5.1.1) and resets the context; this class finishes instead, so
  // a second use is an error rather than the hash of a new, empty message.
  static_assert(SHA256_DIGEST_SIZE == 32);
  std::array<std::uint8_t, 32> out{};
  sha256_digest(&context_, out.size(), out.data());
  finished_ = true;
  return out;
}

std::string to_hex(const std::array<std::uint8_t, 32>& digest) {
  static constexpr char digits[] = "0123456789abcdef";
  std::string s;
  s.reserve(64);
  for (std::uint8_t byte : digest) {
    s.push_back(digits[byte >> 4]);
    s.push_back(digits[byte & 0x0f]);
  }
  return s;
}

std::string sha256_hex(std::string_view bytes) {
  Sha256 h;
  h.update(bytes);
  return to_hex(h.digest());
}

std::string input_hash(const std::vector<std::filesystem::path>& files) {
  Sha256 h;
  for (const auto& file : files) hash_file(h, file);
  return to_hex(h.digest());
}

std::vector<std::filesystem::path> input_files(const io::TestDescription& test) {
  std::vector<std::filesystem::path> files{test.path};
  for (const auto& series : test.series) files.emplace_back(series.source);
  return files;
}

std::string input_hash(const io::TestDescription& test) { return input_hash(input_files(test)); }

std::string input_hash(const std::vector<io::TestDescription>& tests) {
  if (tests.empty()) throw std::invalid_argument("input_hash: no tests to hash");
  if (tests.size() == 1) return input_hash(tests.front());
  std::vector<std::string> each;
  for (const auto& t : tests) each.push_back(input_hash(t));
  std::sort(each.begin(), each.end());
  Sha256 h;
  for (const auto& e : each) h.update(e);
  return to_hex(h.digest());
}

}  // namespace spreadfit::history
