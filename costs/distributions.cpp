#include "costs/distributions.hpp"

#include <boost/math/distributions/lognormal.hpp>
#include <boost/math/distributions/normal.hpp>
#include <boost/math/distributions/triangular.hpp>
#include <boost/math/distributions/uniform.hpp>

#include <cmath>
#include <sstream>
#include <stdexcept>

namespace unchain::costs {

const char* distribution_name(DistributionKind kind) {
  switch (kind) {
    case DistributionKind::uniform: return "uniform";
    case DistributionKind::triangular: return "triangular";
    case DistributionKind::normal: return "normal";
    case DistributionKind::lognormal: return "lognormal";
  }
  return "?";
}

namespace {

std::string text(double v) {
  std::ostringstream out;
  out.precision(6);
  out << v;
  return out.str();
}

void require_finite(double v, const char* name) {
  if (!std::isfinite(v)) throw std::invalid_argument(std::string(name) + " must be a finite number");
}

}  // namespace

Distribution Distribution::uniform(double low, double high) {
  require_finite(low, "low");
  require_finite(high, "high");
  if (!(low < high))
    throw std::invalid_argument("low must be below high (found low " + text(low) + ", high " + text(high) + ")");
  Distribution d;
  d.kind_ = DistributionKind::uniform;
  d.a_ = low;
  d.b_ = high;
  return d;
}

Distribution Distribution::triangular(double low, double mode, double high) {
  require_finite(low, "low");
  require_finite(mode, "mode");
  require_finite(high, "high");
  if (!(low < high))
    throw std::invalid_argument("low must be below high (found low " + text(low) + ", high " + text(high) + ")");
  if (!(low <= mode && mode <= high))
    throw std::invalid_argument("mode must lie between low and high (found low " + text(low) + ", mode " +
                                text(mode) + ", high " + text(high) + ")");
  Distribution d;
  d.kind_ = DistributionKind::triangular;
  d.a_ = low;
  d.b_ = mode;
  d.c_ = high;
  return d;
}

Distribution Distribution::normal(double mean, double standard_deviation) {
  require_finite(mean, "mean");
  require_finite(standard_deviation, "standard_deviation");
  if (!(standard_deviation > 0))
    throw std::invalid_argument("standard_deviation must be positive (found " + text(standard_deviation) + ")");
  Distribution d;
  d.kind_ = DistributionKind::normal;
  d.a_ = mean;
  d.b_ = standard_deviation;
  return d;
}

Distribution Distribution::lognormal_from_median(double median, double log_standard_deviation) {
  require_finite(median, "median");
  require_finite(log_standard_deviation, "log_standard_deviation");
  if (!(median > 0)) throw std::invalid_argument("median must be positive (found " + text(median) + ")");
  if (!(log_standard_deviation > 0))
    throw std::invalid_argument("log_standard_deviation must be positive (found " + text(log_standard_deviation) +
                                ")");
  Distribution d;
  d.kind_ = DistributionKind::lognormal;
  d.a_ = std::log(median);
  d.b_ = log_standard_deviation;
  return d;
}

Distribution Distribution::lognormal_from_mean(double mean, double standard_deviation) {
  require_finite(mean, "mean");
  require_finite(standard_deviation, "standard_deviation");
  if (!(mean > 0)) throw std::invalid_argument("mean must be positive (found " + text(mean) + ")");
  if (!(standard_deviation > 0))
    throw std::invalid_argument("standard_deviation must be positive (found " + text(standard_deviation) + ")");
  // sigma^2 = ln(1 + (s/m)^2), mu = ln m - sigma^2 / 2.
  const double sigma2 = std::log1p((standard_deviation / mean) * (standard_deviation / mean));
  Distribution d;
  d.kind_ = DistributionKind::lognormal;
  d.a_ = std::log(mean) - 0.5 * sigma2;
  d.b_ = std::sqrt(sigma2);
  return d;
}

double Distribution::quantile(double p) const {
  namespace bm = boost::math;
  switch (kind_) {
    case DistributionKind::uniform: return a_ + p * (b_ - a_);
    case DistributionKind::triangular: return bm::quantile(bm::triangular_distribution<double>(a_, b_, c_), p);
    case DistributionKind::normal: return bm::quantile(bm::normal_distribution<double>(a_, b_), p);
    case DistributionKind::lognormal: return bm::quantile(bm::lognormal_distribution<double>(a_, b_), p);
  }
  return 0;
}

double Distribution::cdf(double x) const {
  namespace bm = boost::math;
  switch (kind_) {
    case DistributionKind::uniform: return x <= a_ ? 0.0 : x >= b_ ? 1.0 : (x - a_) / (b_ - a_);
    case DistributionKind::triangular:
      return x <= a_ ? 0.0 : x >= c_ ? 1.0 : bm::cdf(bm::triangular_distribution<double>(a_, b_, c_), x);
    case DistributionKind::normal: return bm::cdf(bm::normal_distribution<double>(a_, b_), x);
    case DistributionKind::lognormal: return x <= 0 ? 0.0 : bm::cdf(bm::lognormal_distribution<double>(a_, b_), x);
  }
  return 0;
}

double Distribution::mean() const {
  switch (kind_) {
    case DistributionKind::uniform: return 0.5 * (a_ + b_);
    case DistributionKind::triangular: return (a_ + b_ + c_) / 3.0;
    case DistributionKind::normal: return a_;
    case DistributionKind::lognormal: return std::exp(a_ + 0.5 * b_ * b_);
  }
  return 0;
}

double Distribution::standard_deviation() const {
  switch (kind_) {
    case DistributionKind::uniform: return (b_ - a_) / std::sqrt(12.0);
    case DistributionKind::triangular:
      return std::sqrt((a_ * a_ + b_ * b_ + c_ * c_ - a_ * b_ - a_ * c_ - b_ * c_) / 18.0);
    case DistributionKind::normal: return b_;
    case DistributionKind::lognormal: return std::sqrt(std::expm1(b_ * b_)) * std::exp(a_ + 0.5 * b_ * b_);
  }
  return 0;
}

std::string Distribution::describe() const {
  switch (kind_) {
    case DistributionKind::uniform: return "uniform(low " + text(a_) + ", high " + text(b_) + ")";
    case DistributionKind::triangular:
      return "triangular(low " + text(a_) + ", mode " + text(b_) + ", high " + text(c_) + ")";
    case DistributionKind::normal: return "normal(mean " + text(a_) + ", standard deviation " + text(b_) + ")";
    case DistributionKind::lognormal:
      return "lognormal(median " + text(std::exp(a_)) + ", log standard deviation " + text(b_) + ")";
  }
  return "?";
}

namespace {

std::uint64_t splitmix64_mix(std::uint64_t z) {
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
  return z ^ (z >> 31);
}

}  // namespace

// The state starts from a hash of both numbers, so that neighbouring seeds
// and neighbouring indices give unrelated streams.
SampleGenerator::SampleGenerator(std::uint64_t seed, std::uint64_t sample_index)
    : state_(splitmix64_mix(splitmix64_mix(seed + 0x9e3779b97f4a7c15ULL) ^ sample_index)) {}

std::uint64_t SampleGenerator::next_bits() {
  state_ += 0x9e3779b97f4a7c15ULL;
  return splitmix64_mix(state_);
}

double SampleGenerator::next_open_unit() {
  return (static_cast<double>(next_bits() >> 11) + 0.5) * 0x1.0p-53;
}

}  // namespace unchain::costs
