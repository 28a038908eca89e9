#pragma once
// Monte Carlo uncertainty of a case's key figures (docs/uncertainty.md).
//
// The case's `uncertainty` section names parameters (dotted paths, as for
// --set) and their distributions. Each sample draws one value per
// parameter, writes it back as an override, evaluates the case through a
// PreparedCase and keeps the key figures. Samples run on several threads;
// results are reduced in sample order, so a seed gives identical results
// whatever the thread count. Memory does not grow with the sample count:
// statistics are streamed, and the samples themselves go to a callback
// (the app writes them to CSV) in sample order.

#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "costs/case_study.hpp"
#include "costs/distributions.hpp"

namespace unchain::costs {

struct UncertainParameter {
  std::string path;            // dotted path into the case, as for --set
  std::string label;           // for people; the path when not given
  std::string unit;            // unit of the values ("" for a bare number)
  Distribution distribution;   // in `unit`
  SourceLocation where;

  [[nodiscard]] std::string override_text(double value) const { return study_value_text(value, unit); }
};

struct UncertaintySettings {
  std::size_t samples = 1000;
  std::uint64_t seed = 1;
  std::vector<UncertainParameter> parameters;
};

// Reads the case's `uncertainty` section. Every problem (a bad
// distribution, low > high, a negative spread, a path that names nothing in
// the case, a value with the wrong dimension) is reported together in one
// InputError naming file, line, column and key. Call it before sampling,
// not while other threads evaluate the case.
UncertaintySettings read_uncertainty_settings(const PreparedCase& prepared);

// Streamed quantiles: a histogram of `fine_bins` equal bins whose range
// starts as that of the first `warm_up` values and doubles (merging pairs
// of bins, counts kept exactly) whenever a value falls outside it. A
// quantile is interpolated within the bin that holds it, so it is within
// one bin width (resolution()) of the empirical quantile of the values
// seen. Deterministic for a given order of values.
class StreamingHistogram {
 public:
  explicit StreamingHistogram(std::size_t fine_bins = 4096, std::size_t warm_up = 1024);
  void add(double x);
  [[nodiscard]] std::size_t count() const { return count_; }
  // The p-quantile (0 <= p <= 1) of the values seen; NaN when none.
  [[nodiscard]] double quantile(double p) const;
  // Width of one fine bin: the bound on the quantile error. 0 when all
  // values are equal or fewer than two were seen.
  [[nodiscard]] double resolution() const;
  // The counts merged into at most `bins` equal bins spanning [min, max].
  struct Bin {
    double low = 0, high = 0;
    std::size_t count = 0;
  };
  [[nodiscard]] std::vector<Bin> display(std::size_t bins) const;

 private:
  std::size_t bins_, warm_up_;
  std::vector<double> pending_;      // values seen before the range is set
  std::vector<std::size_t> counts_;
  double low_ = 0, width_ = 0;       // range [low_, low_ + bins_ * width_)
  double min_ = 0, max_ = 0;
  std::size_t count_ = 0;

  void start();
  void place(double x);
  void grow_to(double x);
  [[nodiscard]] double quantile_of_pending(double p) const;
};

struct OutputStatistics {
  std::string key, label, unit;      // as in KeyFigure
  std::size_t count = 0;             // samples in which the figure had a value
  double mean = 0;
  double standard_deviation = 0;     // sample standard deviation (n - 1)
  double minimum = 0, maximum = 0;
  double p10 = 0, p50 = 0, p90 = 0;
  double quantile_error = 0;         // bound on |P - empirical quantile| from the binning
  std::vector<StreamingHistogram::Bin> histogram;  // for the HTML report
};

struct SampleRecord {
  std::size_t index = 0;
  std::vector<double> inputs;                   // one per parameter, in its unit
  bool failed = false;
  std::string error;                            // first error of a failed sample
  std::vector<std::optional<double>> outputs;   // one per key figure, in MonteCarloResult::base order
};

struct MonteCarloOptions {
  std::optional<std::size_t> samples;    // replaces uncertainty.samples
  std::optional<std::uint64_t> seed;     // replaces uncertainty.seed
  unsigned threads = 0;                  // 0: every core
  std::size_t display_bins = 40;
  // Called once before sampling with the base figures (every parameter at
  // its median), whose keys name SampleRecord::outputs.
  std::function<void(const CaseFigures&)> on_start;
  // Called for every sample in sample order, from the calling thread.
  std::function<void(const SampleRecord&)> on_sample;
  // Called from the calling thread as samples complete: done, total.
  std::function<void(std::size_t, std::size_t)> on_progress;
};

struct MonteCarloResult {
  std::size_t samples = 0;
  std::uint64_t seed = 0;
  unsigned threads = 0;
  std::vector<UncertainParameter> parameters;
  CaseFigures base;                          // every parameter at its median
  std::vector<OutputStatistics> outputs;     // key figures with a value in at least one sample
  std::optional<double> probability_npv_positive;  // among samples with an NPV
  std::size_t failed = 0;                    // samples whose evaluation threw
  std::optional<std::size_t> first_failed_sample;
  std::string first_error;

  [[nodiscard]] const OutputStatistics* find(std::string_view key) const;
};

// Runs the samples. The base evaluation (every parameter at its median)
// runs first, so that a value the case refuses is an InputError before any
// sampling. A failed sample is counted and the first error kept; when every
// sample fails, ConvergenceError carries the first error.
MonteCarloResult run_monte_carlo(const PreparedCase& prepared, const UncertaintySettings& settings,
                                 const MonteCarloOptions& options = {});

}  // namespace unchain::costs
