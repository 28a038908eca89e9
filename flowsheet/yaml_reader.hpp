#pragma once
// Reading YAML mappings with their place in the file.
//
// A MappingReader hands out the values of one YAML mapping, converting
// "number unit" strings to typed quantities, and records every key asked
// for. finish() then reports each key that no one asked for as an error with
// a "did you mean" suggestion: an unknown key is never silently ignored.
// Errors go to a DiagnosticList so that one run reports many mistakes.

#include <yaml-cpp/yaml.h>

#include <optional>
#include <set>
#include <string>
#include <string_view>
#include <vector>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/unit_parser.hpp"

namespace unchain {

// Limits on input size and nesting, so that a hostile or mistaken file is
// refused instead of exhausting memory.
inline constexpr std::size_t max_input_bytes = 16u * 1024u * 1024u;
inline constexpr int max_nesting_depth = 64;

struct YamlDocument {
  std::string file;  // name used in messages
  YAML::Node root;
};

// Loads YAML text; a syntax error becomes an InputError with file, line and
// column. Tabs used for indentation and over-deep nesting are refused.
YamlDocument parse_yaml_text(std::string_view text, std::string file_name);
// Reads and parses a file; a missing or unreadable file is an InputError.
YamlDocument load_yaml_file(const std::string& path);

SourceLocation location_of(const YAML::Node& node, const std::string& file);

// Levenshtein distance, for suggestions.
std::size_t edit_distance(std::string_view a, std::string_view b);
// The closest candidate within a sensible distance, or empty.
std::string closest_match(std::string_view word, const std::vector<std::string>& candidates);

class MappingReader {
 public:
  // `path` names the mapping in messages, e.g. "blocks.dryer".
  MappingReader(YAML::Node node, std::string file, std::string path, DiagnosticList& diagnostics,
                std::string currency = {});

  [[nodiscard]] bool is_valid() const { return valid_; }
  [[nodiscard]] bool has(std::string_view key) const;
  [[nodiscard]] const std::string& file() const { return file_; }
  [[nodiscard]] const std::string& path() const { return path_; }
  [[nodiscard]] const std::string& currency() const { return currency_; }
  [[nodiscard]] DiagnosticList& diagnostics() const { return *diagnostics_; }
  [[nodiscard]] SourceLocation location() const;
  [[nodiscard]] SourceLocation location_of_key(std::string_view key) const;
  [[nodiscard]] const YAML::Node& node() const { return node_; }

  // The raw node of a key (marks it as known); an undefined node if absent.
  YAML::Node raw(std::string_view key);
  // Marks a key as known without reading it (read elsewhere).
  void accept(std::string_view key);

  std::optional<std::string> optional_text(std::string_view key);
  std::string text(std::string_view key);  // required
  std::string text(std::string_view key, std::string fallback);

  std::optional<double> optional_number(std::string_view key);
  double number(std::string_view key);  // required
  double number(std::string_view key, double fallback);
  // A number within [low, high]; an error otherwise.
  double number_in(std::string_view key, double fallback, double low, double high);
  std::optional<double> optional_number_in(std::string_view key, double low, double high);

  std::optional<bool> optional_flag(std::string_view key);
  bool flag(std::string_view key, bool fallback);

  template <class Q>
  std::optional<Q> optional_quantity(std::string_view key);
  template <class Q>
  Q quantity(std::string_view key);  // required
  template <class Q>
  Q quantity(std::string_view key, Q fallback);

  // Nested mapping reader (the key is required unless `required` is false).
  std::optional<MappingReader> optional_mapping(std::string_view key);
  MappingReader mapping(std::string_view key);

  // Reports a problem at a key (or at the mapping when key is empty).
  void error(std::string_view key, const std::string& message) const;
  void warning(std::string_view key, const std::string& message) const;

  // Reports every key present but never asked for.
  void finish();

 private:
  YAML::Node node_;
  std::string file_;
  std::string path_;
  DiagnosticList* diagnostics_;
  std::string currency_;
  std::set<std::string, std::less<>> known_;
  bool valid_ = false;
  // The mapping's scalar keys and their values, in file order. yaml-cpp
  // finds a key by converting every key of the map to a string, which made
  // key lookups most of the cost of loading a case; blocks look up many
  // keys, most of them absent.
  std::vector<std::pair<std::string, YAML::Node>> entries_;

  // The value of a key present in the mapping, or nullptr.
  [[nodiscard]] const YAML::Node* find_entry(std::string_view key) const;
  // The value of a key, or an undefined node when it is absent.
  [[nodiscard]] YAML::Node value_of(std::string_view key) const;

  std::string key_path(std::string_view key) const;
  void report_conversion_error(std::string_view key, const UnitError& e) const;
};

// Reads a scalar "number unit" node as Q, reporting errors at the node.
template <class Q>
std::optional<Q> read_quantity_node(const YAML::Node& node, const std::string& file,
                                    const std::string& key_path, DiagnosticList& diagnostics,
                                    std::string_view currency = {});

// ---- templates -------------------------------------------------------------

namespace detail {
std::optional<ParsedQuantity> parse_node(const YAML::Node& node, const std::string& file,
                                         const std::string& key_path, DiagnosticList& diagnostics);
}

template <class Q>
std::optional<Q> read_quantity_node(const YAML::Node& node, const std::string& file,
                                    const std::string& key_path, DiagnosticList& diagnostics,
                                    std::string_view currency) {
  auto p = detail::parse_node(node, file, key_path, diagnostics);
  if (!p) return std::nullopt;
  try {
    return convert_parsed<Q>(*p, currency);
  } catch (const UnitError& e) {
    diagnostics.error(location_of(node, file), "'" + key_path + "': " + e.what());
    return std::nullopt;
  }
}

template <class Q>
std::optional<Q> MappingReader::optional_quantity(std::string_view key) {
  if (!has(key)) {
    accept(key);
    return std::nullopt;
  }
  accept(key);
  return read_quantity_node<Q>(value_of(key), file_, key_path(key), *diagnostics_, currency_);
}

template <class Q>
Q MappingReader::quantity(std::string_view key) {
  if (!has(key)) {
    accept(key);
    error({}, "missing required key '" + key_path(key) + "' (expected " + dimension_of<Q>().describe() + ")");
    return Q::from_value(0.0);
  }
  auto q = optional_quantity<Q>(key);
  return q ? *q : Q::from_value(0.0);
}

template <class Q>
Q MappingReader::quantity(std::string_view key, Q fallback) {
  auto q = optional_quantity<Q>(key);
  return q ? *q : fallback;
}

}  // namespace unchain
