#include "units/splitter.hpp"

#include <cmath>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "units/block_helpers.hpp"
#include "units/block_registry.hpp"

namespace unchain::units {

namespace {

// How the feed is divided. Either every outlet has a fraction, or every
// outlet but one has a fixed amount and that one takes the remainder.
struct SplitRule {
  std::vector<double> fractions;                 // by fractions: one per outlet
  std::vector<std::optional<double>> amounts_kg; // by amounts: empty entry = the remainder
  [[nodiscard]] bool by_fractions() const { return !fractions.empty(); }
  [[nodiscard]] std::size_t outlet_count() const { return by_fractions() ? fractions.size() : amounts_kg.size(); }
};

class Splitter final : public BlockModel {
 public:
  explicit Splitter(SplitRule rule) : rule_(std::move(rule)) {}

  [[nodiscard]] std::vector<PortSpec> inlet_ports() const override {
    return {single_port("feed", "stream to be divided")};
  }
  [[nodiscard]] std::vector<PortSpec> outlet_ports() const override {
    return {list_port("products", "the parts, in the order of the fractions or amounts")};
  }

  void compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const override {
    const Stream& feed = ports.inlet("feed");
    const auto& products = ports.outlets("products");
    if (products.size() != rule_.outlet_count())
      throw ModelError("splitter '" + context.block_name + "' has " + std::to_string(products.size()) +
                       " product streams but " + std::to_string(rule_.outlet_count()) +
                       (rule_.by_fractions() ? " fractions" : " amounts"));

    const std::vector<double> parts = fractions_of(feed, context.block_name);
    // Every outlet but the remainder is a scaled copy of the feed; the
    // remainder is what is left, so the split closes mass to round-off.
    const std::size_t remainder = remainder_index();
    Stream left = feed;
    for (std::size_t i = 0; i < products.size(); ++i) {
      if (i == remainder) continue;
      *products[i] = feed.scaled(parts[i]);
      for (Phase phase : all_phases) left.phase_masses(phase) -= products[i]->phase_masses(phase);
    }
    for (Phase phase : all_phases) left.phase_masses(phase) = left.phase_masses(phase).cwiseMax(0.0);
    *products[remainder] = left;
    for (std::size_t i = 0; i < products.size(); ++i) {
      resources.add_figure("fraction_" + std::to_string(i + 1), parts[i], "-",
                           "share of the feed mass sent to product " + std::to_string(i + 1));
    }
  }

 private:
  SplitRule rule_;

  [[nodiscard]] std::size_t remainder_index() const {
    if (rule_.by_fractions()) return rule_.fractions.size() - 1;
    for (std::size_t i = 0; i < rule_.amounts_kg.size(); ++i)
      if (!rule_.amounts_kg[i]) return i;
    return rule_.amounts_kg.size() - 1;
  }

  [[nodiscard]] std::vector<double> fractions_of(const Stream& feed, const std::string& name) const {
    if (rule_.by_fractions()) return rule_.fractions;
    const double total = to_si(feed.total_mass());
    double fixed = 0.0;
    for (const auto& a : rule_.amounts_kg) fixed += a.value_or(0.0);
    // A part in 1e12 allows for round-off when the amounts add up to the feed.
    if (fixed > total * (1.0 + 1e-12))
      throw ModelError("splitter '" + name + "': the fixed amounts add up to " + format_number(fixed) +
                       " kg, more than the feed of " + format_number(total) + " kg");
    std::vector<double> parts;
    for (const auto& a : rule_.amounts_kg)
      parts.push_back(total > 0.0 ? (a ? *a / total : std::max(0.0, 1.0 - fixed / total)) : (a ? 0.0 : 1.0));
    return parts;
  }
};

SplitRule read_fractions(MappingReader& parameters) {
  SplitRule rule;
  const YAML::Node node = parameters.raw("fractions");
  const std::string path = parameters.path() + ".fractions";
  if (!node.IsSequence() || node.size() < 2) {
    parameters.error("fractions", "'" + path + "' must be a list of at least two fractions, such as [0.3, 0.7]");
    return rule;
  }
  double sum = 0.0;
  bool valid = true;
  for (std::size_t i = 0; i < node.size(); ++i) {
    const std::string item_path = path + "[" + std::to_string(i) + "]";
    auto parsed = detail::parse_node(node[i], parameters.file(), item_path, parameters.diagnostics());
    if (!parsed) {
      valid = false;
      continue;
    }
    if (!parsed->dimension.is_dimensionless()) {
      parameters.diagnostics().error(location_of(node[i], parameters.file()),
                                     "'" + item_path + "': wrong dimension (expected a plain fraction, found " +
                                         parsed->dimension.describe() + ")");
      valid = false;
      continue;
    }
    const double f = parsed->si_value();
    if (f < 0.0 || f > 1.0) {
      parameters.diagnostics().error(location_of(node[i], parameters.file()),
                                     "'" + item_path + "' out of range (expected 0 to 1, found " + format_number(f) + ")");
      valid = false;
    }
    sum += f;
    rule.fractions.push_back(f);
  }
  if (valid && std::abs(sum - 1.0) > 1e-9) {
    parameters.error("fractions", "'" + path + "' must add up to 1 (expected 1 within 1e-9, found " +
                                      format_number(sum, 12) + ")");
    valid = false;
  }
  if (!valid) rule.fractions.clear();
  return rule;
}

SplitRule read_amounts(MappingReader& parameters, Basis basis) {
  SplitRule rule;
  const YAML::Node node = parameters.raw("amounts");
  const std::string path = parameters.path() + ".amounts";
  if (!node.IsSequence() || node.size() < 2) {
    parameters.error("amounts", "'" + path + "' must be a list of at least two entries, such as [\"0.5 kg\", rest]");
    return rule;
  }
  int rest_count = 0;
  bool valid = true;
  for (std::size_t i = 0; i < node.size(); ++i) {
    const std::string item_path = path + "[" + std::to_string(i) + "]";
    if (node[i].IsScalar() && node[i].Scalar() == "rest") {
      ++rest_count;
      rule.amounts_kg.emplace_back(std::nullopt);
      continue;
    }
    auto m = read_mass_per_basis(node[i], parameters, item_path, basis);
    if (!m) {
      valid = false;
      continue;
    }
    if (to_si(*m) < 0.0) {
      parameters.diagnostics().error(location_of(node[i], parameters.file()),
                                     "'" + item_path + "' must not be negative (found " + format_number(to_si(*m)) + " kg)");
      valid = false;
    }
    rule.amounts_kg.emplace_back(to_si(*m));
  }
  if (rest_count != 1) {
    parameters.error("amounts", "'" + path + "' needs exactly one entry `rest` for the remainder (found " +
                                    std::to_string(rest_count) + ")");
    valid = false;
  }
  if (!valid) rule.amounts_kg.clear();
  return rule;
}

// When the block's own mapping lists its products (as a case file does),
// a count that differs from the fractions or amounts is reported now, at
// the place in the file, rather than when the case is solved.
void check_outlet_count(MappingReader& parameters, const SplitRule& rule) {
  if (rule.outlet_count() == 0) return;
  const YAML::Node outlets = parameters.raw("outlets");
  if (!outlets.IsDefined() || !outlets.IsMap()) return;
  const YAML::Node products = outlets["products"];
  if (!products.IsDefined() || !products.IsSequence()) return;
  if (products.size() == rule.outlet_count()) return;
  parameters.error("outlets", "'" + parameters.path() + ".outlets.products' lists " + std::to_string(products.size()) +
                                  " streams (expected " + std::to_string(rule.outlet_count()) + ", one per " +
                                  (rule.by_fractions() ? "fraction" : "amount") + ")");
}

std::unique_ptr<BlockModel> make_splitter(MappingReader& parameters, const BlockSetup& setup) {
  SplitRule rule;
  const bool has_fractions = parameters.has("fractions");
  const bool has_amounts = parameters.has("amounts");
  parameters.accept("fractions");
  parameters.accept("amounts");
  if (has_fractions && has_amounts) {
    parameters.error("amounts", "give either 'fractions' or 'amounts', not both");
  } else if (has_fractions) {
    rule = read_fractions(parameters);
  } else if (has_amounts) {
    rule = read_amounts(parameters, setup.basis);
  } else {
    parameters.error({}, "missing required key '" + parameters.path() +
                             ".fractions' or '.amounts' (expected a list such as [0.3, 0.7] or [\"0.5 kg\", rest])");
  }
  check_outlet_count(parameters, rule);
  parameters.finish();
  // With bad parameters the loader reports the diagnostics and never
  // solves; an even split keeps the model well-formed meanwhile.
  if (rule.outlet_count() == 0) rule.fractions = {0.5, 0.5};
  return std::make_unique<Splitter>(std::move(rule));
}

}  // namespace

void register_splitter(BlockRegistry& registry) {
  registry.add({"splitter", "divides a feed into products of the same composition, by fractions or amounts",
                make_splitter});
}

}  // namespace unchain::units
