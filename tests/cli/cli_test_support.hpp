// Running the spreadfit binary from a test: arguments quoted for the shell, stdout and stderr captured.
#pragma once

#include <doctest/doctest.h>
#include <sys/wait.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <string>

#include "tests/io/io_test_support.hpp"

namespace {

using spreadfit::io::test::TempDir;

inline std::string read_text(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

/// A shell word: the text in single quotes (the scratch paths and arguments here hold no single quote).
inline std::string quoted(const std::string& text) {
  REQUIRE(text.find('\'') == std::string::npos);
  return "'" + text + "'";
}

/// What one run of the binary gave.
struct Run {
  std::string command;
  int exit_code = -1;
  std::string out, err;
};

/// Runs `spreadfit ARGUMENTS` (already quoted for the shell) with stdout and stderr captured in `dir`.
inline Run run_spreadfit(const TempDir& dir, const std::string& arguments) {
  const auto out = dir.path() / "stdout.txt";
  const auto err = dir.path() / "stderr.txt";
  const std::string command =
      quoted(SPREADFIT_BINARY) + " " + arguments + " >" + quoted(out.string()) + " 2>" + quoted(err.string());
  const int status = std::system(command.c_str());
  REQUIRE_MESSAGE(WIFEXITED(status), "the command did not exit normally: " << command);
  return Run{command, WEXITSTATUS(status), read_text(out), read_text(err)};
}

}  // namespace
