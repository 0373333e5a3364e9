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

// FIPS 180-4 section 4.2.2: the first 32 bits of the fractional parts of the cube roots of the first 64 primes.
// (tests/history/test_history_db.cpp derives them again from that definition.)
constexpr std::array<std::uint32_t, 64> kRound = {
    0x428a2f98, 0x71374491, 0xb5c0fbcf, 0xe9b5dba5, 0x3956c25b, 0x59f111f1, 0x923f82a4, 0xab1c5ed5,
    0xd807aa98, 0x12835b01, 0x243185be, 0x550c7dc3, 0x72be5d74, 0x80deb1fe, 0x9bdc06a7, 0xc19bf174,
    0xe49b69c1, 0xefbe4786, 0x0fc19dc6, 0x240ca1cc, 0x2de92c6f, 0x4a7484aa, 0x5cb0a9dc, 0x76f988da,
    0x983e5152, 0xa831c66d, 0xb00327c8, 0xbf597fc7, 0xc6e00bf3, 0xd5a79147, 0x06ca6351, 0x14292967,
    0x27b70a85, 0x2e1b2138, 0x4d2c6dfc, 0x53380d13, 0x650a7354, 0x766a0abb, 0x81c2c92e, 0x92722c85,
    0xa2bfe8a1, 0xa81a664b, 0xc24b8b70, 0xc76c51a3, 0xd192e819, 0xd6990624, 0xf40e3585, 0x106aa070,
    0x19a4c116, 0x1e376c08, 0x2748774c, 0x34b0bcb5, 0x391c0cb3, 0x4ed8aa4a, 0x5b9cca4f, 0x682e6ff3,
    0x748f82ee, 0x78a5636f, 0x84c87814, 0x8cc70208, 0x90befffa, 0xa4506ceb, 0xbef9a3f7, 0xc67178f2};

// FIPS 180-4 section 5.3.3: the first 32 bits of the fractional parts of the square roots of the first 8 primes.
constexpr std::array<std::uint32_t, 8> kInitial = {0x6a09e667, 0xbb67ae85, 0x3c6ef372, 0xa54ff53a,
                                                   0x510e527f, 0x9b05688c, 0x1f83d9ab, 0x5be0cd19};

constexpr std::uint32_t rotr(std::uint32_t x, int n) { return (x >> n) | (x << (32 - n)); }

// FIPS 180-4 section 4.1.2, functions (4.2) to (4.7).
constexpr std::uint32_t ch(std::uint32_t x, std::uint32_t y, std::uint32_t z) { return (x & y) ^ (~x & z); }
constexpr std::uint32_t maj(std::uint32_t x, std::uint32_t y, std::uint32_t z) { return (x & y) ^ (x & z) ^ (y & z); }
constexpr std::uint32_t big_sigma0(std::uint32_t x) { return rotr(x, 2) ^ rotr(x, 13) ^ rotr(x, 22); }
constexpr std::uint32_t big_sigma1(std::uint32_t x) { return rotr(x, 6) ^ rotr(x, 11) ^ rotr(x, 25); }
constexpr std::uint32_t small_sigma0(std::uint32_t x) { return rotr(x, 7) ^ rotr(x, 18) ^ (x >> 3); }
constexpr std::uint32_t small_sigma1(std::uint32_t x) { return rotr(x, 17) ^ rotr(x, 19) ^ (x >> 10); }

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

namespace detail {
const std::array<std::uint32_t, 64>& sha256_round_constants() { return kRound; }
const std::array<std::uint32_t, 8>& sha256_initial_hash() { return kInitial; }
}  // namespace detail

Sha256::Sha256() : state_(kInitial) {}

void Sha256::compress(const std::uint8_t* block) {
  // FIPS 180-4 section 6.2.2.
  std::array<std::uint32_t, 64> w{};
  for (std::size_t t = 0; t < 16; ++t)
    w[t] = (std::uint32_t(block[4 * t]) << 24) | (std::uint32_t(block[4 * t + 1]) << 16) |
           (std::uint32_t(block[4 * t + 2]) << 8) | std::uint32_t(block[4 * t + 3]);
  for (std::size_t t = 16; t < 64; ++t)
    w[t] = small_sigma1(w[t - 2]) + w[t - 7] + small_sigma0(w[t - 15]) + w[t - 16];
  std::uint32_t a = state_[0], b = state_[1], c = state_[2], d = state_[3];
  std::uint32_t e = state_[4], f = state_[5], g = state_[6], h = state_[7];
  for (std::size_t t = 0; t < 64; ++t) {
    const std::uint32_t t1 = h + big_sigma1(e) + ch(e, f, g) + kRound[t] + w[t];
    const std::uint32_t t2 = big_sigma0(a) + maj(a, b, c);
    h = g;
    g = f;
    f = e;
    e = d + t1;
    d = c;
    c = b;
    b = a;
    a = t1 + t2;
  }
  state_[0] += a;
  state_[1] += b;
  state_[2] += c;
  state_[3] += d;
  state_[4] += e;
  state_[5] += f;
  state_[6] += g;
  state_[7] += h;
}

void Sha256::update(std::string_view bytes) {
  if (finished_) throw std::logic_error("Sha256::update after digest()");
  length_ += bytes.size();
  const auto* p = reinterpret_cast<const std::uint8_t*>(bytes.data());
  std::size_t n = bytes.size();
  if (buffered_ > 0) {
    const std::size_t take = std::min(n, buffer_.size() - buffered_);
    std::memcpy(buffer_.data() + buffered_, p, take);
    buffered_ += take;
    p += take;
    n -= take;
    if (buffered_ < buffer_.size()) return;
    compress(buffer_.data());
    buffered_ = 0;
  }
  for (; n >= 64; p += 64, n -= 64) compress(p);
  if (n > 0) std::memcpy(buffer_.data(), p, n);
  buffered_ = n;
}

std::array<std::uint8_t, 32> Sha256::digest() {
  if (finished_) throw std::logic_error("Sha256::digest called twice");
  // FIPS 180-4 section 5.1.1: a 1 bit, zeros up to 448 mod 512 bits, then the length in bits (64-bit big-endian).
  const std::uint64_t bits = length_ * 8;
  std::array<char, 72> tail{};
  tail[0] = static_cast<char>(0x80);
  const std::size_t used = static_cast<std::size_t>(length_ % 64);
  const std::size_t zeros = (used < 56 ? 56 - used : 120 - used) - 1;
  for (int i = 0; i < 8; ++i) tail[1 + zeros + std::size_t(i)] = static_cast<char>((bits >> (56 - 8 * i)) & 0xff);
  update(std::string_view(tail.data(), 1 + zeros + 8));
  finished_ = true;
  std::array<std::uint8_t, 32> out{};
  for (std::size_t i = 0; i < 8; ++i)
    for (std::size_t k = 0; k < 4; ++k) out[4 * i + k] = static_cast<std::uint8_t>(state_[i] >> (24 - 8 * k));
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
