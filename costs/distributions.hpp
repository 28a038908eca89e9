#pragma once
// Probability distributions of uncertain case inputs (docs/uncertainty.md).
//
// Every distribution is sampled by its inverse cumulative distribution
// function (quantile) applied to a uniform number in (0, 1): one uniform
// number per parameter per sample, so a sample depends only on the seed,
// its index and the parameter order, never on the platform's
// <random> distribution algorithms or on the thread that drew it.
//
// Values are in the unit the case wrote them in (a price in USD/kWh, a
// temperature in degC); spreads (a standard deviation, "10 K") are
// differences in that same unit.

#include <cstdint>
#include <string>

namespace unchain::costs {

enum class DistributionKind { uniform, triangular, normal, lognormal };
const char* distribution_name(DistributionKind kind);

class Distribution {
 public:
  // Each factory throws std::invalid_argument with a message that names the
  // offending parameter (low > high, a negative standard deviation...).
  static Distribution uniform(double low, double high);
  static Distribution triangular(double low, double mode, double high);
  static Distribution normal(double mean, double standard_deviation);
  // ln X ~ N(ln median, log_sd^2); log_sd is dimensionless.
  static Distribution lognormal_from_median(double median, double log_standard_deviation);
  // A lognormal with the given mean and standard deviation of X itself.
  static Distribution lognormal_from_mean(double mean, double standard_deviation);

  [[nodiscard]] DistributionKind kind() const { return kind_; }
  // Inverse CDF; p in (0, 1).
  [[nodiscard]] double quantile(double p) const;
  [[nodiscard]] double cdf(double x) const;
  [[nodiscard]] double mean() const;
  [[nodiscard]] double standard_deviation() const;
  [[nodiscard]] double median() const { return quantile(0.5); }
  // A short description such as "triangular(low 0.1, mode 0.2, high 0.4)".
  [[nodiscard]] std::string describe() const;

 private:
  DistributionKind kind_ = DistributionKind::uniform;
  // uniform: low, high; triangular: low, mode, high; normal: mean, sd;
  // lognormal: mu and sigma of ln X.
  double a_ = 0, b_ = 0, c_ = 0;
};

// The generator of one sample: SplitMix64 (Steele, Lea and Flood, "Fast
// splittable pseudorandom number generators", OOPSLA 2014), seeded from
// (seed, sample index) so that sample i is the same whatever thread draws
// it and whatever the thread count.
class SampleGenerator {
 public:
  SampleGenerator(std::uint64_t seed, std::uint64_t sample_index);
  std::uint64_t next_bits();
  // Uniform in the open interval (0, 1): (k + 0.5) / 2^53.
  double next_open_unit();

 private:
  std::uint64_t state_;
};

}  // namespace unchain::costs
