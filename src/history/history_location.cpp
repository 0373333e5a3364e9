#include "src/history/history_location.hpp"

#include <cstdlib>
#include <vector>

namespace spreadfit::history {

namespace {

constexpr std::string_view kDesignators[] = {"postgresql://", "postgres://"};

/// RFC 3986 percent-decoding (2.1); a malformed escape is kept as written.
std::string percent_decoded(std::string_view s) {
  auto hex = [](char c) -> int {
    if (c >= '0' && c <= '9') return c - '0';
    if (c >= 'a' && c <= 'f') return c - 'a' + 10;
    if (c >= 'A' && c <= 'F') return c - 'A' + 10;
    return -1;
  };
  std::string out;
  for (std::size_t i = 0; i < s.size(); ++i) {
    if (s[i] == '%' && i + 2 < s.size() && hex(s[i + 1]) >= 0 && hex(s[i + 2]) >= 0) {
      out.push_back(static_cast<char>(hex(s[i + 1]) * 16 + hex(s[i + 2])));
      i += 2;
    } else {
      out.push_back(s[i]);
    }
  }
  return out;
}

/// The parts of a URI: designator, user information (before the last '@' of the authority; empty when none),
/// the rest of the authority and path, and the query (after '?', without it).
struct UriParts {
  std::string_view designator, userinfo, rest, query;
  bool has_userinfo = false, has_query = false;
};

UriParts split(std::string_view uri) {
  UriParts p;
  for (std::string_view d : kDesignators)
    if (uri.substr(0, d.size()) == d) p.designator = d;
  std::string_view body = uri.substr(p.designator.size());
  if (const auto q = body.find('?'); q != std::string_view::npos) {
    p.query = body.substr(q + 1);
    p.has_query = true;
    body = body.substr(0, q);
  }
  // A password may hold '/' or ':' when it was not percent-encoded; '@' must be (%40), so the last '@' before the
  // query ends the user information.
  if (const auto at = body.rfind('@'); at != std::string_view::npos) {
    p.userinfo = body.substr(0, at);
    p.has_userinfo = true;
    p.rest = body.substr(at + 1);
  } else {
    p.rest = body;
  }
  return p;
}

std::vector<std::string_view> query_items(std::string_view query) {
  std::vector<std::string_view> items;
  while (!query.empty()) {
    const auto amp = query.find('&');
    items.push_back(query.substr(0, amp));
    if (amp == std::string_view::npos) break;
    query = query.substr(amp + 1);
  }
  return items;
}

bool is_password_item(std::string_view item) {
  constexpr std::string_view key = "password=";
  return item.substr(0, key.size()) == key || item == "password";
}

}  // namespace

bool is_server_uri(std::string_view location) {
  for (std::string_view d : kDesignators)
    if (location.substr(0, d.size()) == d) return true;
  return false;
}

std::string display_name(std::string_view location) {
  if (!is_server_uri(location)) return std::string(location);
  const UriParts p = split(location);
  std::string out(p.designator);
  if (p.has_userinfo) {
    out.append(p.userinfo.substr(0, p.userinfo.find(':')));  // the user name; the password after ':' is dropped
    out.push_back('@');
  }
  out.append(p.rest);
  if (p.has_query) {
    std::string kept;
    for (std::string_view item : query_items(p.query))
      if (!is_password_item(item)) {
        if (!kept.empty()) kept.push_back('&');
        kept.append(item);
      }
    if (!kept.empty()) out += "?" + kept;
  }
  return out;
}

std::string without_passwords(std::string text, std::string_view location) {
  constexpr std::size_t kShortest = 4;
  constexpr std::string_view kHidden = "(password hidden)";
  std::vector<std::string> secrets;
  if (is_server_uri(location)) {
    const UriParts p = split(location);
    if (const auto colon = p.userinfo.find(':'); colon != std::string_view::npos) {
      secrets.emplace_back(p.userinfo.substr(colon + 1));
      secrets.push_back(percent_decoded(p.userinfo.substr(colon + 1)));
    }
    for (std::string_view item : query_items(p.query))
      if (is_password_item(item) && item.size() > 9) {
        secrets.emplace_back(item.substr(9));
        secrets.push_back(percent_decoded(item.substr(9)));
      }
  }
  if (const char* env = std::getenv("PGPASSWORD")) secrets.emplace_back(env);
  for (const std::string& secret : secrets) {
    if (secret.size() < kShortest) continue;
    for (std::size_t at = text.find(secret); at != std::string::npos; at = text.find(secret, at + kHidden.size()))
      text.replace(at, secret.size(), kHidden);
  }
  return text;
}

}  // namespace spreadfit::history
