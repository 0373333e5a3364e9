// An optional path on the command line, for the command registrations (command_registration.hpp): the text CLI11
// fills and the option that says whether it was given.
#pragma once

#include <CLI/CLI.hpp>
#include <filesystem>
#include <optional>
#include <string>

namespace spreadfit::cli {

/// Held where it is declared (CLI11 keeps a reference to `value`), never copied once added.
struct PathOption {
  std::string value;
  CLI::Option* option = nullptr;

  void add_to(CLI::App& app, const std::string& name, const std::string& type, const std::string& help) {
    option = app.add_option(name, value, help)->type_name(type);
  }
  std::optional<std::filesystem::path> get() const {
    if (option == nullptr || option->count() == 0) return std::nullopt;
    return std::filesystem::path(value);
  }
};

/// The text of an optional string option, nullopt when it was not given.
inline std::optional<std::string> given_text(const CLI::Option* option, const std::string& value) {
  if (option == nullptr || option->count() == 0) return std::nullopt;
  return value;
}

}  // namespace spreadfit::cli
