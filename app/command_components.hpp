#pragma once
// `unchain components`: the built-in component data with every source.

#include <CLI/CLI.hpp>

#include <iosfwd>

#include "app/results_json.hpp"
#include "flowsheet/component_library.hpp"

namespace unchain::app {

struct ComponentsOptions {
  bool json = false;
};

CLI::App* add_components_command(CLI::App& parent, ComponentsOptions& options);
int run_components_command(const ComponentsOptions& options, std::ostream& out);

// The library as JSON (layout in docs/cli.md): every value in SI with its
// unit and source, correlations with coefficients and validity range.
Json component_to_json(const Component& c);
Json library_to_json(const ComponentLibrary& library);
// The overview table and the per-component data with sources.
std::string library_text(const ComponentLibrary& library);

}  // namespace unchain::app
