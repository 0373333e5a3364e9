// Shared by the libFuzzer targets: the readers that take a file get the input written to a scratch file; every
// bad input must come back as io::InputError (or UnitError for the quantity parser), never as a crash, a sanitizer
// report or another exception.
#pragma once

#include <unistd.h>

#include <cstdint>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>
#include <string_view>

namespace spreadfit::fuzz {

/// A scratch folder per process (removed at exit) holding `name` with the fuzzer's bytes.
inline std::filesystem::path scratch_file(const std::string& name, const std::uint8_t* data, std::size_t size) {
  static const std::filesystem::path folder = [] {
    const auto f = std::filesystem::temp_directory_path() / ("spreadfit-fuzz-" + std::to_string(::getpid()));
    std::filesystem::create_directories(f);
    std::atexit([] {
      std::error_code ec;
      std::filesystem::remove_all(std::filesystem::temp_directory_path() /
                                      ("spreadfit-fuzz-" + std::to_string(::getpid())),
                                  ec);
    });
    return f;
  }();
  const auto file = folder / name;
  std::ofstream out(file, std::ios::binary | std::ios::trunc);
  out.write(reinterpret_cast<const char*>(data), static_cast<std::streamsize>(size));
  return file;
}

}  // namespace spreadfit::fuzz
