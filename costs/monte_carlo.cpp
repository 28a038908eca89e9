// Monte Carlo uncertainty: reading the `uncertainty` section, the sampling
// engine and the streamed statistics. Methods: docs/uncertainty.md.

#include "costs/monte_carlo.hpp"

#include <boost/accumulators/accumulators.hpp>
#include <boost/accumulators/statistics/count.hpp>
#include <boost/accumulators/statistics/max.hpp>
#include <boost/accumulators/statistics/mean.hpp>
#include <boost/accumulators/statistics/min.hpp>
#include <boost/accumulators/statistics/stats.hpp>
#include <boost/accumulators/statistics/variance.hpp>

#include <algorithm>
#include <atomic>
#include <cmath>
#include <limits>
#include <set>
#include <stdexcept>
#include <thread>

#include "costs/chunk_workers.hpp"

namespace unchain::costs {

// ---- reading the section -------------------------------------------------------

namespace {

struct ParameterReader {
  MappingReader& m;
  const std::string& reference_text;  // the value that fixes the unit
  bool ok = true;

  // The text of a scalar key, or nothing (an error when required).
  static std::optional<std::string> scalar(MappingReader& m, std::string_view key, bool required) {
    const YAML::Node node = m.raw(key);
    if (!node.IsDefined() || node.IsNull()) {
      if (required) m.error({}, "missing required key '" + m.path() + "." + std::string(key) + "'");
      return std::nullopt;
    }
    if (!node.IsScalar()) {
      m.error(key, "'" + m.path() + "." + std::string(key) + "': expected a value such as \"0.24 USD/kWh\" or 0.5");
      return std::nullopt;
    }
    return node.Scalar();
  }

  // A value of the distribution in the reference unit.
  std::optional<double> value(std::string_view key, bool difference) {
    auto t = scalar(m, key, true);
    if (!t) {
      ok = false;
      return std::nullopt;
    }
    try {
      return parse_study_value(*t, reference_text, difference);
    } catch (const UnitError& e) {
      m.error(key, "'" + m.path() + "." + std::string(key) + "': " + e.what());
      ok = false;
      return std::nullopt;
    }
  }

  // A dimensionless value (the log standard deviation).
  std::optional<double> bare_number(std::string_view key) {
    auto t = scalar(m, key, true);
    if (!t) {
      ok = false;
      return std::nullopt;
    }
    try {
      return parse_study_value(*t, "1", false);
    } catch (const UnitError& e) {
      m.error(key, "'" + m.path() + "." + std::string(key) + "': " + e.what() +
                       " (the log standard deviation is a bare number)");
      ok = false;
      return std::nullopt;
    }
  }
};

const std::vector<std::string>& distribution_names() {
  static const std::vector<std::string> names{"uniform", "triangular", "normal", "lognormal"};
  return names;
}

// The key whose value fixes the unit of the distribution's values.
const char* reference_key(const std::string& kind, bool has_median) {
  if (kind == "uniform" || kind == "triangular") return "low";
  if (kind == "lognormal" && has_median) return "median";
  return "mean";
}

std::optional<UncertainParameter> read_parameter(MappingReader& p, const PreparedCase& prepared) {
  UncertainParameter out;
  out.where = p.location();
  out.path = p.text("path");
  out.label = p.text("label", out.path);
  const std::string kind = p.text("distribution");
  bool ok = !out.path.empty() && !kind.empty();
  if (!out.path.empty()) {
    if (auto missing = missing_case_path(prepared.document(), prepared.path(), out.path)) {
      p.error("path", "'" + p.path() + ".path': " + *missing);
      ok = false;
    }
  }
  if (kind.empty()) return std::nullopt;
  if (std::find(distribution_names().begin(), distribution_names().end(), kind) == distribution_names().end()) {
    std::string message = "'" + p.path() + ".distribution': unknown distribution (expected uniform, triangular, "
                          "normal or lognormal, found '" + kind + "')";
    const std::string suggestion = closest_match(kind, distribution_names());
    if (!suggestion.empty()) message += " (did you mean '" + suggestion + "'?)";
    p.error("distribution", message);
    // The values cannot be checked without a distribution; they are not unknown keys.
    for (const char* key : {"low", "mode", "high", "mean", "median", "standard_deviation", "log_standard_deviation"})
      p.accept(key);
    return std::nullopt;
  }
  const bool has_median = p.has("median");
  const char* ref_key = reference_key(kind, has_median);
  const auto reference = ParameterReader::scalar(p, ref_key, true);
  if (!reference) return std::nullopt;
  try {
    out.unit = parse_study_reference(*reference).unit;
  } catch (const UnitError& e) {
    p.error(ref_key, "'" + p.path() + "." + ref_key + "': " + e.what());
    return std::nullopt;
  }
  ParameterReader r{p, *reference};
  try {
    if (kind == "uniform") {
      const auto low = r.value("low", false), high = r.value("high", false);
      if (r.ok) out.distribution = Distribution::uniform(*low, *high);
    } else if (kind == "triangular") {
      const auto low = r.value("low", false), mode = r.value("mode", false), high = r.value("high", false);
      if (r.ok) out.distribution = Distribution::triangular(*low, *mode, *high);
    } else if (kind == "normal") {
      const auto mean = r.value("mean", false), sd = r.value("standard_deviation", true);
      if (r.ok) out.distribution = Distribution::normal(*mean, *sd);
    } else if (has_median) {
      const auto median = r.value("median", false);
      const auto sd = r.bare_number("log_standard_deviation");
      if (r.ok) out.distribution = Distribution::lognormal_from_median(*median, *sd);
    } else {
      const auto mean = r.value("mean", false), sd = r.value("standard_deviation", true);
      if (r.ok) out.distribution = Distribution::lognormal_from_mean(*mean, *sd);
    }
  } catch (const std::invalid_argument& e) {
    p.error({}, "'" + p.path() + "': " + kind + " distribution: " + e.what());
    return std::nullopt;
  }
  if (!r.ok || !ok) return std::nullopt;
  return out;
}

}  // namespace

UncertaintySettings read_uncertainty_settings(const PreparedCase& prepared) {
  const YAML::Node& doc = prepared.document();
  const std::string& file = prepared.path();
  if (!doc.IsMap() || !doc["uncertainty"] || doc["uncertainty"].IsNull())
    throw InputError(SourceLocation{file, 0, 0},
                     "the case has no 'uncertainty' section (expected uncertainty: {samples, seed, parameters: "
                     "[{path, distribution, ...}]}; see docs/uncertainty.md)");
  DiagnosticList diagnostics;
  const std::string currency = doc["case"] && doc["case"]["currency"] && doc["case"]["currency"].IsScalar()
                                   ? doc["case"]["currency"].Scalar()
                                   : std::string("USD");
  MappingReader m(doc["uncertainty"], file, "uncertainty", diagnostics, currency);
  if (!m.is_valid()) diagnostics.throw_if_errors();
  UncertaintySettings settings;
  const double samples = m.number_in("samples", 1000, 1, 1e9);
  if (samples != std::floor(samples))
    m.error("samples", "'uncertainty.samples': expected a whole number of samples");
  settings.samples = static_cast<std::size_t>(samples);
  // Seeds up to 2^53 so that every seed is written exactly in YAML and JSON.
  const double seed = m.number_in("seed", 1, 0, 9007199254740992.0);
  if (seed != std::floor(seed)) m.error("seed", "'uncertainty.seed': expected a whole number");
  settings.seed = static_cast<std::uint64_t>(seed);

  const YAML::Node list = m.raw("parameters");
  if (!list.IsDefined() || list.IsNull()) {
    m.error({}, "missing required key 'uncertainty.parameters' (expected a list of {path, distribution, ...})");
  } else if (!list.IsSequence() || list.size() == 0) {
    diagnostics.error(location_of(list, file),
                      "'uncertainty.parameters' must be a non-empty list of {path, distribution, ...}");
  } else {
    std::set<std::string> paths;
    std::size_t index = 0;
    for (const auto& item : list) {
      MappingReader p(item, file, "uncertainty.parameters[" + std::to_string(index++) + "]", diagnostics, currency);
      if (!p.is_valid()) continue;
      auto parameter = read_parameter(p, prepared);
      p.finish();
      if (!parameter) continue;
      if (!paths.insert(parameter->path).second) {
        diagnostics.error(parameter->where, "'" + p.path() + "': '" + parameter->path +
                                                "' is already an uncertain parameter (expected each path once)");
        continue;
      }
      settings.parameters.push_back(std::move(*parameter));
    }
  }
  m.finish();
  diagnostics.throw_if_errors();
  return settings;
}

// ---- streamed quantiles ---------------------------------------------------------

StreamingHistogram::StreamingHistogram(std::size_t fine_bins, std::size_t warm_up)
    : bins_(std::max<std::size_t>(2, fine_bins + fine_bins % 2)), warm_up_(std::max<std::size_t>(2, warm_up)) {
  pending_.reserve(warm_up_);
}

void StreamingHistogram::add(double x) {
  if (!std::isfinite(x)) return;
  if (count_ == 0) min_ = max_ = x;
  min_ = std::min(min_, x);
  max_ = std::max(max_, x);
  ++count_;
  if (counts_.empty()) {
    pending_.push_back(x);
    if (pending_.size() >= warm_up_) start();
    return;
  }
  place(x);
}

void StreamingHistogram::start() {
  const double lo = *std::min_element(pending_.begin(), pending_.end());
  const double hi = *std::max_element(pending_.begin(), pending_.end());
  double span = hi - lo;
  if (!(span > 0)) span = std::max(std::abs(lo), 1.0) * 1e-9;
  counts_.assign(bins_, 0);
  low_ = lo;
  width_ = span / static_cast<double>(bins_);
  for (double v : pending_) place(v);
  pending_.clear();
  pending_.shrink_to_fit();
}

void StreamingHistogram::grow_to(double x) {
  const std::size_t half = bins_ / 2;
  while (x < low_) {
    // Double the range downwards: old bin i becomes half of new bin B/2 + i/2.
    std::vector<std::size_t> merged(bins_, 0);
    for (std::size_t i = 0; i < bins_; ++i) merged[half + i / 2] += counts_[i];
    counts_.swap(merged);
    low_ -= static_cast<double>(bins_) * width_;
    width_ *= 2;
  }
  while (x > low_ + static_cast<double>(bins_) * width_) {
    std::vector<std::size_t> merged(bins_, 0);
    for (std::size_t i = 0; i < bins_; ++i) merged[i / 2] += counts_[i];
    counts_.swap(merged);
    width_ *= 2;
  }
}

void StreamingHistogram::place(double x) {
  grow_to(x);
  const double position = std::floor((x - low_) / width_);
  const auto index = static_cast<std::size_t>(std::clamp(position, 0.0, static_cast<double>(bins_ - 1)));
  ++counts_[index];
}

double StreamingHistogram::quantile_of_pending(double p) const {
  // Fewer values than the warm-up: the exact order statistic of rank ceil(p n).
  std::vector<double> sorted = pending_;
  std::sort(sorted.begin(), sorted.end());
  const double rank = std::ceil(p * static_cast<double>(sorted.size()));
  const auto i = static_cast<std::size_t>(std::clamp(rank, 1.0, static_cast<double>(sorted.size()))) - 1;
  return sorted[i];
}

double StreamingHistogram::quantile(double p) const {
  if (count_ == 0) return std::numeric_limits<double>::quiet_NaN();
  p = std::clamp(p, 0.0, 1.0);
  if (p == 0.0) return min_;
  if (p == 1.0) return max_;
  if (counts_.empty()) return quantile_of_pending(p);
  const double target = p * static_cast<double>(count_);
  double before = 0;
  for (std::size_t k = 0; k < bins_; ++k) {
    const double c = static_cast<double>(counts_[k]);
    if (c > 0 && before + c >= target) {
      const double x = low_ + (static_cast<double>(k) + (target - before) / c) * width_;
      return std::clamp(x, min_, max_);
    }
    before += c;
  }
  return max_;
}

double StreamingHistogram::resolution() const { return counts_.empty() || max_ == min_ ? 0.0 : width_; }

std::vector<StreamingHistogram::Bin> StreamingHistogram::display(std::size_t bins) const {
  std::vector<Bin> out;
  if (count_ == 0 || bins == 0) return out;
  if (counts_.empty() || max_ == min_) {
    // Exact values: equal bins over [min, max].
    const std::size_t n = max_ == min_ ? 1 : bins;
    const double w = (max_ - min_) / static_cast<double>(n);
    for (std::size_t i = 0; i < n; ++i) out.push_back({min_ + w * i, i + 1 == n ? max_ : min_ + w * (i + 1), 0});
    const auto& values = pending_;
    if (counts_.empty()) {
      for (double v : values) {
        const double pos = w > 0 ? std::floor((v - min_) / w) : 0.0;
        out[static_cast<std::size_t>(std::clamp(pos, 0.0, static_cast<double>(n - 1)))].count++;
      }
    } else {
      out[0].count = count_;
    }
    return out;
  }
  std::size_t first = 0, last = bins_ - 1;
  while (first < bins_ && counts_[first] == 0) ++first;
  while (last > first && counts_[last] == 0) --last;
  const std::size_t occupied = last - first + 1;
  const std::size_t factor = (occupied + bins - 1) / bins;
  for (std::size_t k = first; k <= last; k += factor) {
    Bin b;
    b.low = low_ + static_cast<double>(k) * width_;
    b.high = low_ + static_cast<double>(std::min(k + factor, last + 1)) * width_;
    for (std::size_t j = k; j < std::min(k + factor, last + 1); ++j) b.count += counts_[j];
    out.push_back(b);
  }
  out.front().low = min_;
  out.back().high = max_;
  return out;
}

// ---- the engine ------------------------------------------------------------------

const OutputStatistics* MonteCarloResult::find(std::string_view key) const {
  for (const auto& o : outputs)
    if (o.key == key) return &o;
  return nullptr;
}

namespace {

namespace ba = boost::accumulators;
using Accumulator =
    ba::accumulator_set<double, ba::stats<ba::tag::count, ba::tag::mean, ba::tag::variance, ba::tag::min, ba::tag::max>>;

SampleRecord evaluate_sample(const PreparedCase& prepared, const UncertaintySettings& settings, std::uint64_t seed,
                             std::size_t index, std::size_t output_count) {
  SampleRecord record;
  record.index = index;
  record.outputs.assign(output_count, std::nullopt);
  // One uniform number per parameter, in parameter order (distributions.hpp).
  SampleGenerator generator(seed, index);
  std::vector<Override> overrides;
  overrides.reserve(settings.parameters.size());
  for (const auto& p : settings.parameters) {
    const double value = p.distribution.quantile(generator.next_open_unit());
    record.inputs.push_back(value);
    overrides.push_back({p.path, p.override_text(value)});
  }
  try {
    const CaseFigures figures = prepared.evaluate(overrides);
    for (std::size_t k = 0; k < output_count && k < figures.figures.size(); ++k)
      record.outputs[k] = figures.figures[k].value;
  } catch (const std::exception& e) {
    record.failed = true;
    record.error = e.what();
  } catch (...) {
    record.failed = true;
    record.error = "unknown error";
  }
  return record;
}

}  // namespace

MonteCarloResult run_monte_carlo(const PreparedCase& prepared, const UncertaintySettings& settings,
                                 const MonteCarloOptions& options) {
  MonteCarloResult r;
  r.samples = options.samples.value_or(settings.samples);
  r.seed = options.seed.value_or(settings.seed);
  r.parameters = settings.parameters;
  if (r.samples == 0) throw InputError(SourceLocation{prepared.path(), 0, 0}, "the number of samples must be at least 1");
  if (settings.parameters.empty())
    throw InputError(SourceLocation{prepared.path(), 0, 0}, "no uncertain parameters (uncertainty.parameters is empty)");
  unsigned threads = options.threads != 0 ? options.threads : std::max(1u, std::thread::hardware_concurrency());
  threads = static_cast<unsigned>(std::min<std::size_t>(threads, r.samples));
  r.threads = threads;

  // The base case: a value the case refuses fails here, before sampling.
  std::vector<Override> base_overrides;
  for (const auto& p : settings.parameters) base_overrides.push_back({p.path, p.override_text(p.distribution.median())});
  r.base = prepared.evaluate(base_overrides);
  if (options.on_start) options.on_start(r.base);

  const std::size_t n_out = r.base.figures.size();
  std::vector<Accumulator> accumulators(n_out);
  std::vector<StreamingHistogram> histograms(n_out);
  std::optional<std::size_t> npv_index;
  for (std::size_t k = 0; k < n_out; ++k)
    if (r.base.figures[k].key == "npv") npv_index = k;
  std::size_t npv_count = 0, npv_positive = 0;

  // Samples run in chunks: the threads fill a chunk, then this thread
  // reduces it in sample order. The chunk bounds memory (a record is a few
  // hundred bytes), and the order makes the statistics independent of which
  // thread computed which sample. The same threads serve every chunk
  // (ChunkWorkers), and the wait at the end of a chunk of some thousand
  // samples is about 0.1 % of its time.
  const std::size_t chunk = std::max<std::size_t>(2048, 512 * static_cast<std::size_t>(threads));
  std::vector<SampleRecord> buffer;
  std::size_t start = 0;
  ChunkWorkers workers(threads, [&](std::size_t i) {
    buffer[i - start] = evaluate_sample(prepared, settings, r.seed, i, n_out);
  });
  for (; start < r.samples; start += chunk) {
    const std::size_t end = std::min(r.samples, start + chunk);
    buffer.assign(end - start, SampleRecord{});
    workers.run(start, end);
    for (const auto& record : buffer) {
      if (record.failed) {
        if (r.failed++ == 0) {
          r.first_failed_sample = record.index;
          r.first_error = record.error;
        }
      } else {
        for (std::size_t k = 0; k < n_out; ++k) {
          if (!record.outputs[k] || !std::isfinite(*record.outputs[k])) continue;
          accumulators[k](*record.outputs[k]);
          histograms[k].add(*record.outputs[k]);
        }
        if (npv_index && record.outputs[*npv_index]) {
          ++npv_count;
          if (*record.outputs[*npv_index] > 0) ++npv_positive;
        }
      }
      if (options.on_sample) options.on_sample(record);
    }
    if (options.on_progress) options.on_progress(end, r.samples);
  }
  if (r.failed == r.samples)
    throw ConvergenceError("all " + std::to_string(r.samples) + " samples failed; the first (sample " +
                           std::to_string(*r.first_failed_sample) + "): " + r.first_error);

  for (std::size_t k = 0; k < n_out; ++k) {
    const auto& a = accumulators[k];
    const std::size_t n = ba::count(a);
    if (n == 0) continue;
    OutputStatistics s;
    s.key = r.base.figures[k].key;
    s.label = r.base.figures[k].label;
    s.unit = r.base.figures[k].unit;
    s.count = n;
    s.mean = ba::mean(a);
    // Boost's variance is the population variance; the sample variance divides by n - 1.
    s.standard_deviation = n > 1 ? std::sqrt(std::max(0.0, ba::variance(a)) * n / (n - 1.0)) : 0.0;
    s.minimum = ba::min(a);
    s.maximum = ba::max(a);
    s.p10 = histograms[k].quantile(0.10);
    s.p50 = histograms[k].quantile(0.50);
    s.p90 = histograms[k].quantile(0.90);
    s.quantile_error = histograms[k].resolution();
    s.histogram = histograms[k].display(options.display_bins);
    r.outputs.push_back(std::move(s));
  }
  if (npv_count > 0) r.probability_npv_positive = static_cast<double>(npv_positive) / static_cast<double>(npv_count);
  return r;
}

}  // namespace unchain::costs
