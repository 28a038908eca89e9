// One case evaluated many times: see case_study.hpp.
//
// Thread safety: the parsed document is shared read-only by every
// evaluation. yaml-cpp nodes are not safe to read from several threads at
// once (reading a sequence's size updates a cached count inside the node),
// so each evaluation works on a deep copy (YAML::Clone) of its own. The
// shared document is read only to make such a copy, under a mutex owned by
// this PreparedCase: evaluate() does so once per copy in its pool (about
// once per thread), evaluate_full() every time. From then on an evaluation
// works on nothing shared but the immutable block registry and component
// library, and the cost settings read once (under their own mutex).

#include "costs/case_study.hpp"

#include <algorithm>
#include <charconv>
#include <filesystem>
#include <mutex>
#include <thread>

#include "costs/closure_check.hpp"
#include "units/block_registry.hpp"

namespace unchain::costs {

const KeyFigure* CaseFigures::find(std::string_view key) const {
  for (const auto& f : figures)
    if (f.key == key) return &f;
  return nullptr;
}

std::optional<double> CaseFigures::value(std::string_view key) const {
  const KeyFigure* f = find(key);
  return f ? f->value : std::nullopt;
}

namespace {

constexpr double J_per_MJ = 1e6;

// The child of a map by key, or of a sequence by index; undefined if none.
// Never inserts (reading only), so it is safe on the shared nodes.
YAML::Node child(const YAML::Node& node, const std::string& key) {
  if (node.IsMap()) {
    for (const auto& kv : node)
      if (kv.first.IsScalar() && kv.first.Scalar() == key) return kv.second;
  } else if (node.IsSequence()) {
    std::size_t index = 0;
    const auto [end, ec] = std::from_chars(key.data(), key.data() + key.size(), index);
    if (ec == std::errc() && end == key.data() + key.size() && index < node.size()) return node[index];
  }
  return YAML::Node(YAML::NodeType::Undefined);
}


double cost_in(const CostReport& r, CostCategory category) {
  double sum = 0;
  for (const auto& line : r.lines)
    if (line.category == category) sum += line.cost;
  return sum;
}

// The discounted cash flow figures, when the case has an economics section
// and a priced monomer (CostReport::cash_flow); absent otherwise.
void add_cash_flow_figures(const CostReport& r, const std::string& currency, std::vector<KeyFigure>& out) {
  std::optional<double> npv, irr, payback, minimum_price;
  if (r.cash_flow) {
    npv = r.cash_flow->npv;
    irr = r.cash_flow->irr;
    payback = r.cash_flow->payback_years;
    minimum_price = r.cash_flow->minimum_selling_price;
  }
  out.push_back({"npv", "Net present value", currency, npv});
  out.push_back({"irr", "Internal rate of return", "-", irr});
  out.push_back({"payback", "Payback period", "yr", payback});
  out.push_back({"minimum_selling_price", "Minimum monomer selling price", currency + "/kg", minimum_price});
}

}  // namespace

CaseFigures key_figures(const Case& c, const CostReport& r) {
  CaseFigures out;
  out.case_file = c.file;
  out.title = c.title;
  out.basis_label = r.basis_label.empty() ? std::string(c.basis == Basis::batch ? "batch" : "hour") : r.basis_label;
  out.currency = c.currency;
  const std::string& cur = c.currency;
  auto& f = out.figures;
  f.push_back({"monomer_per_basis", "Monomer per " + out.basis_label, "kg", r.monomer_kg});
  f.push_back({"monomer_purity", "Monomer purity (mass fraction)", "-", r.monomer_purity});
  f.push_back({"energy_per_kg_monomer", "Purchased energy per kg monomer", "MJ/kg",
               r.per_kg(r.energy_total.purchased_J / J_per_MJ)});
  f.push_back({"net_cost_per_basis", "Net cost per " + out.basis_label, cur, r.net_cost});
  f.push_back({"net_cost_per_kg_monomer", "Net cost per kg monomer", cur + "/kg", r.per_kg(r.net_cost)});
  std::optional<double> labour_share;
  if (r.total_cost > 0) labour_share = cost_in(r, CostCategory::labour) / r.total_cost;
  f.push_back({"labour_share", "Labour share of total cost", "-", labour_share});
  f.push_back({"solvent_lost_per_kg_monomer", "Solvent lost per kg monomer", "kg/kg", r.per_kg(r.solvent_lost_kg)});
  std::optional<double> capital;
  if (r.capital.installed_total > 0) capital = r.capital.installed_total;
  f.push_back({"installed_capital", "Installed capital", cur, capital});
  add_cash_flow_figures(r, cur, f);
  return out;
}

namespace {

// A working copy of the case and, beside it, this copy's own clones of the
// case as read and of the shared price file's prices: restoring the copy
// after a use and making it afresh read only these, so the evaluations on
// different threads share no node and take no lock for it.
struct ReusableDocument {
  YAML::Node pristine;       // null handles until cloned (assignment into one binds)
  YAML::Node shared_prices;
  YAML::Node root;
  bool have_pristine = false;
  bool have_root = false;
  int uses = 0;
  // The thread that last used it: a thread takes back its own copy, whose
  // nodes its own allocator arena holds, so that replacing them frees no
  // memory of another thread's arena (a lock the two threads would share).
  std::thread::id last_user;
};

// The cost settings one study's evaluations share: empty until the first
// of them has read its own.
class SharedCostSettings {
 public:
  [[nodiscard]] std::shared_ptr<const CostSettings> get() const {
    std::lock_guard<std::mutex> lock(mutex_);
    return value_;
  }
  void offer(std::shared_ptr<const CostSettings> read) {
    std::lock_guard<std::mutex> lock(mutex_);
    if (!value_) value_ = std::move(read);
  }

 private:
  mutable std::mutex mutex_;
  std::shared_ptr<const CostSettings> value_;
};

// Held by pointer: assigning a YAML::Node to another writes through to the
// tree it refers to, so the documents must never be moved by assignment.
struct DocumentPool {
  std::mutex mutex;
  std::vector<std::unique_ptr<ReusableDocument>> documents;
};

}  // namespace

struct PreparedCase::State {
  YamlDocument document;
  std::vector<Override> base_overrides;
  const units::BlockRegistry* catalogue = nullptr;
  YAML::Node shared_prices;        // the `prices` of the file named by prices.file, if any
  // The same file read into prices once, so that no evaluation parses it again.
  std::optional<SharedPriceFile> price_file;
  mutable std::mutex clone_mutex;  // guards reads of `document` and `shared_prices` while cloning
  // Copies of `document` that evaluate() hands out one at a time and takes
  // back with the overridden sections put back (see DocumentLease).
  mutable DocumentPool pool;
  // The cost settings (accounting, capital, economics) of the case with
  // the base overrides: read by the first evaluation whose overrides leave
  // them alone (leaves_cost_settings_alone), reused by the later ones.
  mutable SharedCostSettings cost_settings;
  bool base_leaves_cost_settings_alone = false;
};

namespace {

// An override deep inside a price that only the shared price file gives
// (prices.products.styrene.0.price, prices.solvents.acetone) needs the
// file's section in the case first: the case's own `prices` replace the
// file's key by key (costs/price_book.cpp), so the copied section, with the
// override applied, stands for the file's.
void bring_in_shared_prices(YAML::Node& root, const YAML::Node& shared, const std::vector<Override>& overrides) {
  if (!shared.IsDefined() || !shared.IsMap()) return;
  for (const auto& o : overrides) {
    const auto parts = split_override_path(o.path);
    if (parts.size() < 3 || parts[0] != "prices") continue;
    YAML::Node here = child(root, "prices");
    if (!here.IsMap()) continue;
    YAML::Node there = shared;
    for (std::size_t i = 1; i + 1 < parts.size(); ++i) {
      YAML::Node next = child(here, parts[i]);
      YAML::Node in_file = child(there, parts[i]);
      if (!next.IsDefined()) {
        if (!here.IsMap() || !in_file.IsDefined()) break;
        here[parts[i]] = YAML::Clone(in_file);
        next.reset(child(here, parts[i]));  // reset rebinds; assignment would write through
      }
      here.reset(next);
      there.reset(in_file);
    }
  }
}

// True when no override can change what the cost settings are read from:
// each one sets a price (prices are read on every evaluation) or a value
// inside a block or a feed (three parts or more, and not a block's type or
// its inlets and outlets, so no block, stream or component is added,
// removed or renamed, which the settings' checks see). Anything else (the
// capital, accounting or economics sections, the case's currency, a whole
// block or feed, a block's connections) has the settings read again.
bool leaves_cost_settings_alone(const std::vector<Override>& overrides) {
  for (const auto& o : overrides) {
    const auto parts = split_override_path(o.path);
    if (parts.empty()) return false;
    if (parts[0] == "prices") continue;
    if (parts[0] == "feeds" && parts.size() >= 3) continue;
    if (parts[0] == "blocks" && parts.size() >= 3 && parts[2] != "type" && parts[2] != "inlets" &&
        parts[2] != "outlets")
      continue;
    return false;
  }
  return true;
}

}  // namespace

PreparedCase::PreparedCase(const std::string& path, std::vector<Override> base_overrides) : path_(path) {
  auto state = std::make_shared<State>();
  state->document = load_yaml_file(path);
  state->base_overrides = std::move(base_overrides);
  state->catalogue = &units::builtin_blocks();
  const YAML::Node prices = child(state->document.root, "prices");
  const YAML::Node file = child(prices, "file");
  if (file.IsScalar()) {
    try {
      const auto shared_path = std::filesystem::path(path).parent_path() / file.Scalar();
      const YamlDocument shared = load_yaml_file(shared_path.string());
      const YAML::Node section = child(shared.root, "prices");
      state->shared_prices = YAML::Clone(section.IsDefined() ? section : shared.root);
    } catch (const InputError&) {
      // An unreadable price file is reported when the case is costed.
    }
  }
  // Apply the base overrides once to a copy, so that a bad base override is
  // reported here rather than on the first evaluation.
  YAML::Node probe = YAML::Clone(state->document.root);
  bring_in_shared_prices(probe, state->shared_prices, state->base_overrides);
  apply_overrides(probe, state->base_overrides);
  const YAML::Node currency = child(child(probe, "case"), "currency");
  state->price_file = read_shared_price_file(probe, path, currency.IsScalar() ? currency.Scalar() : "USD");
  state->base_leaves_cost_settings_alone = leaves_cost_settings_alone(state->base_overrides);
  state_ = std::move(state);
}

const YAML::Node& PreparedCase::document() const { return state_->document.root; }

namespace {

// Load, solve, check and cost a document with its overrides applied. The
// cost settings come from the case itself, or from `shared` when given
// (the evaluations of one study whose overrides leave them alone).
Evaluation evaluate_document(const YamlDocument& document, const units::BlockRegistry& catalogue,
                             const SharedPriceFile* price_file, const std::string& path,
                             SharedCostSettings* shared = nullptr) {
  auto loaded = std::make_shared<Case>(load_case(document, catalogue));
  Evaluation e;
  e.result = solve(*loaded);
  if (!e.result.converged) throw ConvergenceError("the solve of '" + path + "' did not converge");
  const auto problems = open_balances(e.result);
  if (!problems.empty()) {
    std::string text = problems.front();
    if (problems.size() > 1) text += " (and " + std::to_string(problems.size() - 1) + " more)";
    throw ConvergenceError(text);
  }
  std::shared_ptr<const CostSettings> settings = shared != nullptr ? shared->get() : nullptr;
  e.report = evaluate_case_costs(*loaded, e.result, price_file, settings);
  if (shared != nullptr) shared->offer(settings);
  e.figures = key_figures(*loaded, e.report);
  e.loaded = std::move(loaded);
  return e;
}

// Puts back into `root`, from `pristine`, everything that applying
// `overrides` (and bring_in_shared_prices for them) can have changed: the
// section two levels down that each path runs through, or the top-level
// one when it is not a mapping or the path has one part. A key the
// pristine document does not have is removed.
void restore_overridden(YAML::Node& root, const YAML::Node& pristine, const std::vector<Override>& overrides) {
  for (const auto& o : overrides) {
    const auto parts = split_override_path(o.path);
    const YAML::Node original_top = child(pristine, parts[0]);
    if (!original_top.IsDefined()) {
      if (child(root, parts[0]).IsDefined()) root.remove(parts[0]);
      continue;
    }
    YAML::Node top = child(root, parts[0]);
    if (parts.size() >= 2 && original_top.IsMap() && top.IsMap()) {
      const YAML::Node original = child(original_top, parts[1]);
      if (original.IsDefined()) top[parts[1]] = YAML::Clone(original);
      else if (child(top, parts[1]).IsDefined()) top.remove(parts[1]);
    } else {
      root[parts[0]] = YAML::Clone(original_top);
    }
  }
}

}  // namespace

Evaluation PreparedCase::evaluate_full(const std::vector<Override>& overrides) const {
  YamlDocument copy;
  copy.file = state_->document.file;
  {
    std::lock_guard<std::mutex> lock(state_->clone_mutex);
    copy.root = YAML::Clone(state_->document.root);
    bring_in_shared_prices(copy.root, state_->shared_prices, state_->base_overrides);
    bring_in_shared_prices(copy.root, state_->shared_prices, overrides);
  }
  apply_overrides(copy.root, state_->base_overrides);
  apply_overrides(copy.root, overrides);
  return evaluate_document(copy, *state_->catalogue, state_->price_file ? &*state_->price_file : nullptr, path_);
}

namespace {

// A copy of the document for one evaluate(): taken from the pool (or
// cloned when the pool is empty) and, once the evaluation is over, given
// back with the overridden sections restored from the copy's own pristine
// clone, so that a sample clones a few small sections instead of the whole
// case. Each assignment into a yaml-cpp document keeps the replaced nodes
// alive until the document goes, so the working copy is made afresh (from
// the same private clone) after some uses.
class DocumentLease {
 public:
  DocumentLease(DocumentPool& pool, std::mutex& clone_mutex, const YAML::Node& pristine,
                const YAML::Node& shared_prices, const std::vector<Override>& base_overrides,
                const std::vector<Override>& overrides)
      : pool_(pool), base_overrides_(base_overrides), overrides_(overrides) {
    {
      // At most as many copies as evaluations ever ran at once.
      std::lock_guard<std::mutex> lock(pool_.mutex);
      if (!pool_.documents.empty()) {
        auto& docs = pool_.documents;
        auto own = std::find_if(docs.begin(), docs.end(),
                                [](const auto& d) { return d->last_user == std::this_thread::get_id(); });
        if (own == docs.end()) own = docs.end() - 1;
        held_ = std::move(*own);
        docs.erase(own);
      } else {
        held_ = std::make_unique<ReusableDocument>();
      }
    }
    if (!held_->have_pristine) {  // once per copy: the only reads of the shared nodes
      std::lock_guard<std::mutex> lock(clone_mutex);
      held_->pristine = YAML::Clone(pristine);
      if (shared_prices.IsDefined() && !shared_prices.IsNull()) held_->shared_prices = YAML::Clone(shared_prices);
      held_->have_pristine = true;
    }
    if (!held_->have_root) {
      held_->root = YAML::Clone(held_->pristine);
      held_->have_root = true;
    }
    bring_in_shared_prices(held_->root, held_->shared_prices, base_overrides_);
    bring_in_shared_prices(held_->root, held_->shared_prices, overrides_);
  }
  DocumentLease(const DocumentLease&) = delete;
  DocumentLease& operator=(const DocumentLease&) = delete;
  ~DocumentLease() {
    constexpr int uses_before_fresh_copy = 16;
    try {
      if (++held_->uses >= uses_before_fresh_copy) {
        // A fresh working copy, made on the next lease; the clones it is
        // made from are kept (bound into null handles, not copied).
        auto fresh = std::make_unique<ReusableDocument>();
        fresh->pristine = held_->pristine;
        fresh->shared_prices = held_->shared_prices;
        fresh->have_pristine = true;
        held_ = std::move(fresh);  // the old working copy is freed here, by the thread that used it
      } else {
        restore_overridden(held_->root, held_->pristine, overrides_);
        restore_overridden(held_->root, held_->pristine, base_overrides_);
      }
      held_->last_user = std::this_thread::get_id();
      std::lock_guard<std::mutex> lock(pool_.mutex);
      pool_.documents.push_back(std::move(held_));
    } catch (...) {
      // A copy that cannot be put back is dropped; the next lease clones.
    }
  }
  [[nodiscard]] const YAML::Node& root() const { return held_->root; }

 private:
  DocumentPool& pool_;
  const std::vector<Override>& base_overrides_;
  const std::vector<Override>& overrides_;
  std::unique_ptr<ReusableDocument> held_;
};

}  // namespace

CaseFigures PreparedCase::evaluate(const std::vector<Override>& overrides) const {
  DocumentLease lease(state_->pool, state_->clone_mutex, state_->document.root, state_->shared_prices,
                      state_->base_overrides, overrides);
  YamlDocument copy{state_->document.file, lease.root()};
  apply_overrides(copy.root, state_->base_overrides);
  apply_overrides(copy.root, overrides);
  // The evaluation (and the case, which holds the document) ends before the
  // lease gives the copy back.
  SharedCostSettings* shared = state_->base_leaves_cost_settings_alone && leaves_cost_settings_alone(overrides)
                                  ? &state_->cost_settings
                                  : nullptr;
  return evaluate_document(copy, *state_->catalogue, state_->price_file ? &*state_->price_file : nullptr, path_,
                           shared)
      .figures;
}


// ---- shared by the studies ---------------------------------------------------

namespace {

std::vector<std::string> keys_of(const YAML::Node& map) {
  std::vector<std::string> keys;
  for (const auto& kv : map)
    if (kv.first.IsScalar()) keys.push_back(kv.first.Scalar());
  return keys;
}

// Walks `parts[from..]` from `node`; the message of the first part missing.
std::optional<std::string> walk(YAML::Node node, const std::vector<std::string>& parts, std::size_t from,
                                const std::string& path, const std::string& walked_before, const std::string& where) {
  std::string walked = walked_before;
  for (std::size_t i = from; i < parts.size(); ++i) {
    const std::string& key = parts[i];
    if (key.empty()) return "'" + path + "': empty part in the path (expected KEY.KEY...)";
    const std::string here = walked.empty() ? where : "'" + walked + "'";
    YAML::Node next;
    if (node.IsMap()) {
      const auto keys = keys_of(node);
      if (std::find(keys.begin(), keys.end(), key) == keys.end()) {
        std::string message = "'" + path + "' names nothing in the case: no key '" + key + "' in " + here;
        const std::string suggestion = closest_match(key, keys);
        if (!suggestion.empty()) message += " (did you mean '" + suggestion + "'?)";
        return message;
      }
      next.reset(child(node, key));
    } else if (node.IsSequence()) {
      std::size_t index = 0;
      const auto [end, ec] = std::from_chars(key.data(), key.data() + key.size(), index);
      if (ec != std::errc() || end != key.data() + key.size() || index >= node.size())
        return "'" + path + "' names nothing in the case: " + here + " is a list of " + std::to_string(node.size()) +
               " items (found index '" + key + "')";
      next.reset(child(node, key));
    } else {
      return "'" + path + "' names nothing in the case: " + here + " is a single value, not a section";
    }
    walked += (walked.empty() ? "" : ".") + key;
    node.reset(next);
  }
  return std::nullopt;
}

}  // namespace

std::optional<std::string> missing_case_path(const YAML::Node& document, const std::string& case_file,
                                             const std::string& path) {
  const auto parts = split_override_path(path);
  auto missing = walk(document, parts, 0, path, "", "the document");
  if (!missing || parts.size() < 2 || parts[0] != "prices") return missing;
  // A price given only in the shared price file.
  const YAML::Node prices = document.IsMap() ? document["prices"] : YAML::Node();
  if (!prices.IsMap() || !prices["file"] || !prices["file"].IsScalar()) return missing;
  try {
    const auto file = std::filesystem::path(case_file).parent_path() / prices["file"].Scalar();
    const YamlDocument shared = load_yaml_file(file.string());
    const YAML::Node root = shared.root["prices"].IsDefined() ? shared.root["prices"] : shared.root;
    if (!walk(root, parts, 1, path, "prices", "")) return std::nullopt;
  } catch (const InputError&) {
    // An unreadable price file is reported when the case is costed.
  }
  return missing;
}

StudyValue parse_study_reference(const std::string& text) {
  const ParsedQuantity p = parse_quantity(text);
  return {p.number, p.unit_text};
}

double parse_study_value(const std::string& text, const std::string& reference_text, bool difference) {
  const ParsedQuantity ref = parse_quantity(reference_text);
  const ParsedQuantity q = parse_quantity(text);
  if (!(q.dimension == ref.dimension))
    throw UnitError("expected " + ref.dimension.describe() + " like '" + reference_text + "', found " +
                    q.dimension.describe());
  if (!q.currency.empty() && !ref.currency.empty() && q.currency != ref.currency)
    throw UnitError("wrong currency (expected " + ref.currency + ", found " + q.currency +
                    "); unchain never converts between currencies");
  if (difference) return q.number * q.scale / ref.scale;
  // Absolute values: through kelvin when either is a lone temperature unit.
  const double si = q.number * q.scale + (q.lone_temperature_unit ? q.absolute_offset_K : 0.0);
  const double offset = ref.lone_temperature_unit ? ref.absolute_offset_K : 0.0;
  return (si - offset) / ref.scale;
}

std::string study_value_text(double number, const std::string& unit) {
  char buffer[64];
  const auto [end, ec] = std::to_chars(buffer, buffer + sizeof buffer, number);
  std::string out(buffer, ec == std::errc() ? end : buffer);
  if (!unit.empty()) out += " " + unit;
  return out;
}

}  // namespace unchain::costs
