#pragma once
// A loaded case: components, streams, blocks and solver settings.
// Schema: docs/case-format.md.

#include <yaml-cpp/yaml.h>

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "flowsheet/block_model.hpp"
#include "flowsheet/component_library.hpp"
#include "flowsheet/diagnostics.hpp"
#include "flowsheet/stream.hpp"
#include "flowsheet/yaml_reader.hpp"

namespace unchain {

struct StreamInfo {
  std::string name;
  SourceLocation where;                // where the stream is first named
  std::optional<std::size_t> source;   // producing block, absent for a feed
  std::string source_role;
  std::optional<std::size_t> destination;  // consuming block, absent for a product
  std::string destination_role;
  bool is_feed = false;
  Stream initial;  // feed contents, or the initial estimate of a tear stream
  bool has_initial_estimate = false;  // solver.initial_estimates names this stream
};

struct BlockInstance {
  std::string name;
  std::string type;
  SourceLocation where;
  std::unique_ptr<BlockModel> model;
  // Stream indices by role, in the order written.
  std::map<std::string, std::vector<std::size_t>> inlets;
  std::map<std::string, std::vector<std::size_t>> outlets;
};

enum class ConvergenceMethod { wegstein, direct_substitution };

struct SolverSettings {
  ConvergenceMethod method = ConvergenceMethod::wegstein;
  double tolerance = 1e-10;   // on the largest scaled change of a tear variable
  int max_iterations = 200;
  // Bounds on the Wegstein factor q; q < 0 accelerates, 0 < q < 1 damps.
  double wegstein_q_min = -5.0;
  double wegstein_q_max = 0.9;
  std::vector<std::string> tear_streams;  // named by the user; empty = chosen automatically
  std::vector<SourceLocation> tear_stream_locations;  // where each was named (may be empty)
};

struct Case {
  std::string file;
  std::string title;
  std::string description;
  Basis basis = Basis::batch;
  std::string currency = "USD";
  Temperature ambient_temperature = kelvin(293.15);
  std::shared_ptr<const ComponentSet> components;  // stable address for streams
  std::vector<StreamInfo> streams;
  std::vector<BlockInstance> blocks;
  SolverSettings solver;
  YAML::Node document;  // the whole document (after overrides), for later layers such as prices
  std::vector<Diagnostic> warnings;  // found while loading (a feed that goes nowhere); solve() repeats them

  [[nodiscard]] std::optional<std::size_t> stream_index(std::string_view name) const;
  [[nodiscard]] std::optional<std::size_t> block_index(std::string_view name) const;
};

// A --set override: PATH is a dotted path into the YAML document
// ("blocks.dryer.temperature", "feeds.foam.solid.polystyrene").
struct Override {
  std::string path;
  std::string value;
};

// Applies overrides to a parsed document. A path whose parent does not
// exist is an InputError naming the path and the closest existing key.
void apply_overrides(YAML::Node& root, const std::vector<Override>& overrides);
// The parts of a dotted override path: "blocks.dryer.pressure" gives
// {"blocks", "dryer", "pressure"}; empty parts are kept ("a..b" gives three).
std::vector<std::string> split_override_path(std::string_view path);
// Parses "PATH=VALUE"; throws InputError when there is no '='.
Override parse_override(std::string_view text);

// Loads a case from a parsed document. All input errors found are reported
// together in one InputError.
Case load_case(const YamlDocument& document, const BlockCatalogue& catalogue,
               const ComponentLibrary& library = builtin_library());
Case load_case_file(const std::string& path, const BlockCatalogue& catalogue,
                    const std::vector<Override>& overrides = {});

}  // namespace unchain
