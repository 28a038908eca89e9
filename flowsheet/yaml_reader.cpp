#include "flowsheet/yaml_reader.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <limits>
#include <sstream>
#include <unordered_set>

namespace unchain {

SourceLocation location_of(const YAML::Node& node, const std::string& file) {
  const YAML::Mark mark = node.Mark();
  if (mark.line < 0) return {file, 0, 0};
  return {file, mark.line + 1, mark.column + 1};
}

namespace {

// Walks the tree once: refuses over-deep nesting and duplicate keys, which
// yaml-cpp accepts silently (the later value would win unseen), an alias
// that refers to a node containing it (a cycle, which every later reader
// would follow forever), and a tree that aliases expand beyond
// max_expanded_nodes (a few lines of anchors can stand for billions of nodes).
class StructureCheck {
 public:
  StructureCheck(const std::string& file, DiagnosticList& diagnostics) : file_(file), diagnostics_(diagnostics) {}

  // False once an error makes walking further pointless. `holder` is where
  // the node is named: its key in a mapping, else unknown (line 0).
  bool walk(const YAML::Node& node, SourceLocation holder = {}) {
    if (++visited_ > max_expanded_nodes) {
      diagnostics_.error(location_of(node, file_),
                         "the YAML aliases expand to more than " + std::to_string(max_expanded_nodes) +
                             " values (expected a case that names each value once or reuses a few)");
      return false;
    }
    for (const auto& ancestor : ancestors_)
      if (ancestor.is(node)) {
        // Reported at the key that holds the alias (an alias keeps no place
        // of its own in yaml-cpp), naming where the anchored value starts.
        const SourceLocation anchor = location_of(node, file_);
        diagnostics_.error(holder.line > 0 ? holder : anchor,
                           "recursive YAML alias: the alias here refers to the anchored value (line " +
                               std::to_string(anchor.line) + ") that contains it (expected a tree, found a cycle)");
        return false;
      }
    if (static_cast<int>(ancestors_.size()) > max_nesting_depth) {
      diagnostics_.error(location_of(node, file_), "nesting deeper than " + std::to_string(max_nesting_depth) +
                                                       " levels (expected a flatter file)");
      return false;
    }
    if (!node.IsMap() && !node.IsSequence()) return true;
    ancestors_.push_back(node);
    bool go_on = true;
    if (node.IsMap()) {
      std::unordered_set<std::string> seen;  // a set: a map of many keys stays linear
      for (const auto& item : node) {
        if (item.first.IsScalar()) {
          const std::string& key = item.first.Scalar();
          if (!seen.insert(key).second)
            diagnostics_.error(location_of(item.first, file_), "duplicate key '" + key + "'");
        } else if (!walk(item.first)) {
          go_on = false;
          break;
        }
        if (!walk(item.second, location_of(item.first, file_))) {
          go_on = false;
          break;
        }
      }
    } else {
      for (const auto& item : node)
        if (!walk(item)) {
          go_on = false;
          break;
        }
    }
    ancestors_.pop_back();
    return go_on;
  }

 private:
  // A shipped case has a few thousand values; this leaves room for large
  // user cases while bounding the work of every later reader.
  static constexpr long max_expanded_nodes = 200000;
  const std::string& file_;
  DiagnosticList& diagnostics_;
  std::vector<YAML::Node> ancestors_;
  long visited_ = 0;
};

void check_tabs(std::string_view text, const std::string& file, DiagnosticList& diagnostics) {
  int line = 1;
  bool at_line_start = true;
  int column = 1;
  for (char c : text) {
    if (c == '\n') {
      ++line;
      column = 1;
      at_line_start = true;
      continue;
    }
    if (at_line_start && c == '\t') {
      diagnostics.error({file, line, column}, "tab character in indentation (expected spaces; YAML forbids tabs)");
      at_line_start = false;
    } else if (c != ' ') {
      at_line_start = false;
    }
    ++column;
  }
}

// YAML text is Unicode, and every text of a case may end up in the results
// JSON, which must be valid UTF-8: a stray byte (a file saved in Latin-1)
// is refused here, at its place, rather than failing the JSON writer later.
// Strict UTF-8: no overlong forms, no surrogates, nothing above U+10FFFF.
void check_utf8(std::string_view text, const std::string& file, DiagnosticList& diagnostics) {
  int line = 1;
  int column = 1;
  std::size_t i = 0;
  while (i < text.size()) {
    const auto byte = [&](std::size_t k) { return static_cast<unsigned char>(text[k]); };
    const unsigned char lead = byte(i);
    std::size_t length = 0;
    unsigned char low = 0x80, high = 0xBF;  // allowed range of the first continuation byte
    if (lead < 0x80) length = 1;
    else if (lead >= 0xC2 && lead <= 0xDF) length = 2;
    else if (lead == 0xE0) length = 3, low = 0xA0;
    else if (lead >= 0xE1 && lead <= 0xEC) length = 3;
    else if (lead == 0xED) length = 3, high = 0x9F;
    else if (lead >= 0xEE && lead <= 0xEF) length = 3;
    else if (lead == 0xF0) length = 4, low = 0x90;
    else if (lead >= 0xF1 && lead <= 0xF3) length = 4;
    else if (lead == 0xF4) length = 4, high = 0x8F;
    bool valid = length > 0 && i + length <= text.size();
    for (std::size_t k = 1; valid && k < length; ++k) {
      const unsigned char c = byte(i + k);
      valid = k == 1 ? (c >= low && c <= high) : (c >= 0x80 && c <= 0xBF);
    }
    if (!valid) {
      char hex[8];
      std::snprintf(hex, sizeof hex, "0x%02X", static_cast<unsigned>(lead));
      diagnostics.error({file, line, column},
                        std::string("the file is not valid UTF-8 text (expected UTF-8, found the byte ") + hex + ")");
      return;
    }
    if (lead == '\n') {
      ++line;
      column = 0;
    }
    ++column;
    i += length;
  }
}

}  // namespace

YamlDocument parse_yaml_text(std::string_view text, std::string file_name) {
  DiagnosticList diagnostics;
  if (text.size() > max_input_bytes) {
    diagnostics.error({file_name, 0, 0}, "file too large (expected at most " + std::to_string(max_input_bytes) +
                                             " bytes, found " + std::to_string(text.size()) + ")");
    diagnostics.throw_if_errors();
  }
  check_utf8(text, file_name, diagnostics);
  diagnostics.throw_if_errors();
  check_tabs(text, file_name, diagnostics);
  diagnostics.throw_if_errors();
  YamlDocument doc{std::move(file_name), {}};
  // Cheap guard before parsing: yaml-cpp recurses on nesting, so a file of
  // thousands of '[' must be refused before it reaches the parser.
  int depth = 0;
  int deepest = 0;
  for (char c : text) {
    if (c == '[' || c == '{') deepest = std::max(deepest, ++depth);
    if (c == ']' || c == '}') --depth;
  }
  if (deepest > max_nesting_depth) {
    diagnostics.error({doc.file, 0, 0}, "nesting deeper than " + std::to_string(max_nesting_depth) +
                                            " levels (expected a flatter file)");
    diagnostics.throw_if_errors();
  }
  try {
    doc.root = YAML::Load(std::string(text));
  } catch (const YAML::ParserException& e) {
    diagnostics.error({doc.file, e.mark.line + 1, e.mark.column + 1}, "YAML syntax: " + e.msg);
    diagnostics.throw_if_errors();
  } catch (const YAML::Exception& e) {
    diagnostics.error({doc.file, e.mark.line + 1, e.mark.column + 1}, std::string("YAML: ") + e.what());
    diagnostics.throw_if_errors();
  }
  StructureCheck(doc.file, diagnostics).walk(doc.root);
  diagnostics.throw_if_errors();
  return doc;
}

YamlDocument load_yaml_file(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError({path, 0, 0}, "cannot open file (expected a readable YAML file)");
  std::ostringstream buffer;
  buffer << in.rdbuf();
  if (in.bad()) throw InputError({path, 0, 0}, "cannot read file");
  return parse_yaml_text(buffer.str(), path);
}

std::size_t edit_distance(std::string_view a, std::string_view b) {
  std::vector<std::size_t> previous(b.size() + 1), current(b.size() + 1);
  for (std::size_t j = 0; j <= b.size(); ++j) previous[j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    current[0] = i;
    for (std::size_t j = 1; j <= b.size(); ++j) {
      const std::size_t substitution = previous[j - 1] + (a[i - 1] == b[j - 1] ? 0 : 1);
      current[j] = std::min({previous[j] + 1, current[j - 1] + 1, substitution});
    }
    std::swap(previous, current);
  }
  return previous[b.size()];
}

std::string closest_match(std::string_view word, const std::vector<std::string>& candidates) {
  std::string best;
  std::size_t best_distance = std::numeric_limits<std::size_t>::max();
  for (const auto& c : candidates) {
    const std::size_t d = edit_distance(word, c);
    if (d < best_distance) {
      best_distance = d;
      best = c;
    }
  }
  // Suggest only when the candidate is plausibly what was meant.
  const std::size_t limit = std::max<std::size_t>(2, word.size() / 3);
  return best_distance <= limit ? best : std::string();
}

namespace {
bool absent(const YAML::Node& node) { return !node.IsDefined() || node.IsNull(); }
}  // namespace

MappingReader::MappingReader(YAML::Node node, std::string file, std::string path, DiagnosticList& diagnostics,
                             std::string currency)
    : node_(absent(node) ? YAML::Node(YAML::NodeType::Map) : node),
      file_(std::move(file)),
      path_(std::move(path)),
      diagnostics_(&diagnostics),
      currency_(std::move(currency)) {
  // An absent section reads as an empty mapping. (An absent key of a const
  // node is an "invalid" node that must not be assigned to, hence the
  // choice in the initializer.)
  if (absent(node)) {
    valid_ = true;
    return;
  }
  if (!node_.IsMap()) {
    diagnostics_->error(location_of(node_, file_),
                        "'" + (path_.empty() ? std::string("document") : path_) +
                            "' must be a mapping of keys to values (found " +
                            (node_.IsSequence() ? "a list" : "a single value") + ")");
    return;
  }
  valid_ = true;
  entries_.reserve(node_.size());
  for (const auto& item : node_)
    if (item.first.IsScalar()) entries_.emplace_back(item.first.Scalar(), item.second);
}

const YAML::Node* MappingReader::find_entry(std::string_view key) const {
  for (const auto& [name, value] : entries_)
    if (name == key) return &value;
  return nullptr;
}

YAML::Node MappingReader::value_of(std::string_view key) const {
  if (const YAML::Node* value = find_entry(key)) return *value;
  // A valid node of undefined type, as yaml-cpp's non-const lookup gives for
  // an absent key, but detached: reading a case never adds keys to it.
  return YAML::Node(YAML::NodeType::Undefined);
}

bool MappingReader::has(std::string_view key) const {
  if (!valid_) return false;
  const YAML::Node* value = find_entry(key);
  return value != nullptr && value->IsDefined() && !value->IsNull();
}

SourceLocation MappingReader::location() const { return location_of(node_, file_); }

SourceLocation MappingReader::location_of_key(std::string_view key) const {
  if (valid_) {
    for (const auto& item : node_)
      if (item.first.IsScalar() && item.first.Scalar() == key) return location_of(item.second, file_);
  }
  return location();
}

std::string MappingReader::key_path(std::string_view key) const {
  return path_.empty() ? std::string(key) : path_ + "." + std::string(key);
}

void MappingReader::accept(std::string_view key) { known_.insert(std::string(key)); }

YAML::Node MappingReader::raw(std::string_view key) {
  accept(key);
  if (!valid_) return YAML::Node();
  return value_of(key);
}

void MappingReader::error(std::string_view key, const std::string& message) const {
  diagnostics_->error(key.empty() ? location() : location_of_key(key), message);
}

void MappingReader::warning(std::string_view key, const std::string& message) const {
  diagnostics_->warning(key.empty() ? location() : location_of_key(key), message);
}

std::optional<std::string> MappingReader::optional_text(std::string_view key) {
  accept(key);
  if (!has(key)) return std::nullopt;
  const YAML::Node n = value_of(key);
  if (!n.IsScalar()) {
    diagnostics_->error(location_of(n, file_), "'" + key_path(key) + "' must be a single value (expected text)");
    return std::nullopt;
  }
  return n.Scalar();
}

std::string MappingReader::text(std::string_view key) {
  if (!has(key)) {
    accept(key);
    error({}, "missing required key '" + key_path(key) + "' (expected text)");
    return {};
  }
  return optional_text(key).value_or(std::string());
}

std::string MappingReader::text(std::string_view key, std::string fallback) {
  return optional_text(key).value_or(std::move(fallback));
}

std::optional<double> MappingReader::optional_number(std::string_view key) {
  accept(key);
  if (!has(key)) return std::nullopt;
  auto p = detail::parse_node(value_of(key), file_, key_path(key), *diagnostics_);
  if (!p) return std::nullopt;
  if (!p->dimension.is_dimensionless()) {
    diagnostics_->error(location_of_key(key), "'" + key_path(key) + "': wrong dimension (expected a plain number, found " +
                                                  p->dimension.describe() + " from unit \"" + p->unit_text + "\")");
    return std::nullopt;
  }
  return p->si_value();
}

double MappingReader::number(std::string_view key) {
  if (!has(key)) {
    accept(key);
    error({}, "missing required key '" + key_path(key) + "' (expected a number)");
    return 0.0;
  }
  return optional_number(key).value_or(0.0);
}

double MappingReader::number(std::string_view key, double fallback) { return optional_number(key).value_or(fallback); }

std::optional<double> MappingReader::optional_number_in(std::string_view key, double low, double high) {
  auto v = optional_number(key);
  if (v && (*v < low || *v > high)) {
    std::ostringstream message;
    message << "'" << key_path(key) << "' out of range (expected " << low << " to " << high << ", found " << *v << ")";
    error(key, message.str());
    return std::nullopt;
  }
  return v;
}

double MappingReader::number_in(std::string_view key, double fallback, double low, double high) {
  return optional_number_in(key, low, high).value_or(fallback);
}

std::optional<bool> MappingReader::optional_flag(std::string_view key) {
  accept(key);
  if (!has(key)) return std::nullopt;
  const YAML::Node n = value_of(key);
  const std::string s = n.IsScalar() ? n.Scalar() : std::string();
  if (s == "true" || s == "yes" || s == "on") return true;
  if (s == "false" || s == "no" || s == "off") return false;
  diagnostics_->error(location_of(n, file_), "'" + key_path(key) + "' must be true or false (found \"" + s + "\")");
  return std::nullopt;
}

bool MappingReader::flag(std::string_view key, bool fallback) { return optional_flag(key).value_or(fallback); }

std::optional<MappingReader> MappingReader::optional_mapping(std::string_view key) {
  accept(key);
  if (!has(key)) return std::nullopt;
  MappingReader nested(value_of(key), file_, key_path(key), *diagnostics_, currency_);
  if (!nested.is_valid()) return std::nullopt;
  return nested;
}

MappingReader MappingReader::mapping(std::string_view key) {
  if (!has(key)) {
    accept(key);
    error({}, "missing required section '" + key_path(key) + "'");
    return MappingReader(YAML::Node(), file_, key_path(key), *diagnostics_, currency_);
  }
  auto m = optional_mapping(key);
  if (m) return std::move(*m);
  return MappingReader(YAML::Node(), file_, key_path(key), *diagnostics_, currency_);
}

void MappingReader::finish() {
  if (!valid_) return;
  const std::vector<std::string> candidates(known_.begin(), known_.end());
  for (const auto& item : node_) {
    if (!item.first.IsScalar()) continue;
    const std::string key = item.first.Scalar();
    if (known_.count(key) != 0) continue;
    std::string message = "unknown key '" + key_path(key) + "'";
    const std::string suggestion = closest_match(key, candidates);
    if (!suggestion.empty()) message += " (did you mean '" + suggestion + "'?)";
    diagnostics_->error(location_of(item.first, file_), message);
  }
}

void MappingReader::report_conversion_error(std::string_view key, const UnitError& e) const {
  diagnostics_->error(location_of_key(key), "'" + key_path(key) + "': " + e.what());
}

namespace detail {

std::optional<ParsedQuantity> parse_node(const YAML::Node& node, const std::string& file, const std::string& key_path,
                                         DiagnosticList& diagnostics) {
  if (!node.IsScalar()) {
    diagnostics.error(location_of(node, file), "'" + key_path + "' must be a single value such as \"0.5 kg\"");
    return std::nullopt;
  }
  try {
    return parse_quantity(node.Scalar());
  } catch (const UnitError& e) {
    diagnostics.error(location_of(node, file), "'" + key_path + "': " + e.what());
    return std::nullopt;
  }
}

}  // namespace detail

}  // namespace unchain
