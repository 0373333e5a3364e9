// Helpers for the input-layer tests: a scratch folder removed afterwards, and catching an InputError to look
// at its parts.
#pragma once

#include <doctest/doctest.h>

#include <filesystem>
#include <fstream>
#include <random>
#include <stdexcept>
#include <string>
#include <string_view>

#include "src/io/input_error.hpp"

namespace spreadfit::io::test {

/// A fresh folder under the system's temporary directory, removed with everything in it on destruction.
class TempDir {
 public:
  TempDir() {
    std::random_device seed;
    std::mt19937_64 draw(seed());
    for (int attempt = 0; attempt < 100; ++attempt) {
      path_ = std::filesystem::temp_directory_path() / ("spreadfit-io-test-" + std::to_string(draw()));
      if (std::filesystem::create_directory(path_)) return;
    }
    throw std::runtime_error("could not create a scratch folder under " +
                             std::filesystem::temp_directory_path().string() + " in 100 attempts");
  }
  ~TempDir() {
    std::error_code ec;
    std::filesystem::remove_all(path_, ec);
  }
  TempDir(const TempDir&) = delete;
  TempDir& operator=(const TempDir&) = delete;

  const std::filesystem::path& path() const { return path_; }

  /// Writes `text` byte for byte to `relative` (folders created) and returns the full path.
  std::filesystem::path write(const std::filesystem::path& relative, std::string_view text) const {
    const std::filesystem::path file = path_ / relative;
    std::filesystem::create_directories(file.parent_path());
    std::ofstream out(file, std::ios::binary);
    out.write(text.data(), static_cast<std::streamsize>(text.size()));
    if (!out) throw std::runtime_error("could not write " + file.string());
    return file;
  }

 private:
  std::filesystem::path path_;
};

/// The InputError `f` throws; the test fails when it throws nothing or something else.
template <class F>
InputError input_error_of(F&& f) {
  try {
    f();
  } catch (const InputError& e) {
    return e;
  } catch (const std::exception& e) {
    FAIL("expected an InputError, got another exception: " << e.what());
  }
  FAIL("expected an InputError, nothing was thrown");
  throw std::logic_error("unreachable");
}

}  // namespace spreadfit::io::test
