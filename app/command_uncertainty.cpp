#include "app/command_uncertainty.hpp"

#include <fmt/format.h>
#include <unistd.h>

#include <filesystem>
#include <memory>
#include <ostream>

#include "app/atomic_file.hpp"
#include "app/command_check.hpp"
#include "app/study_output.hpp"
#include "app/csv_tables.hpp"
#include "app/exit_codes.hpp"
#include "costs/monte_carlo.hpp"

namespace unchain::app {

namespace {

// The figures the summary table shows, in order (the JSON and CSV have all).
const std::vector<std::string>& summary_keys() {
  static const std::vector<std::string> keys{"net_cost_per_kg_monomer", "energy_per_kg_monomer", "npv"};
  return keys;
}

std::string document_title(const YAML::Node& document) {
  const YAML::Node title = document["case"] ? document["case"]["title"] : YAML::Node();
  return title && title.IsScalar() ? title.Scalar() : std::string();
}

std::string number(double v) { return fmt::format("{:.4g}", v); }

std::string uncertainty_text(const costs::MonteCarloResult& r, const std::string& title, const std::string& file) {
  std::string out = fmt::format("Monte Carlo uncertainty: {} ({})\n", title, file);
  out += fmt::format("  {} samples, seed {}, {} thread{}; {} failed\n\n", r.samples, r.seed, r.threads,
                     r.threads == 1 ? "" : "s", r.failed);
  out += "Uncertain parameters\n";
  std::vector<std::vector<std::string>> rows;
  for (const auto& p : r.parameters)
    rows.push_back({p.label == p.path ? p.path : p.label + " (" + p.path + ")", p.distribution.describe(),
                    p.unit.empty() ? "-" : p.unit});
  out += study_text_table({"parameter", "distribution", "unit"}, rows);
  out += "\nKey figures (P10, P50, P90: 10th, 50th and 90th percentiles)\n";
  rows.clear();
  for (const auto& key : summary_keys()) {
    const costs::OutputStatistics* s = r.find(key);
    if (!s) continue;
    const std::string name = study_text_heading(study_figure_name(s->key, r.base.basis_label), s->unit);
    rows.push_back({name, number(s->mean), number(s->standard_deviation), number(s->p10), number(s->p50),
                    number(s->p90), number(s->minimum), number(s->maximum), number(s->quantile_error)});
  }
  out += study_text_table({"figure [unit]", "mean", "std dev", "P10", "P50", "P90", "min", "max", "quantile error"},
                          rows);
  if (r.probability_npv_positive)
    out += fmt::format("\nP(NPV > 0): {:.3f} (of the samples with an NPV)\n", *r.probability_npv_positive);
  else if (!r.find("npv"))
    out += "\nno NPV: the case has no discounted cash flow (economics section, monomer price)\n";
  return out;
}

Json histogram_json(const std::vector<costs::StreamingHistogram::Bin>& bins) {
  Json out = Json::array();
  for (const auto& b : bins) out.push_back({{"low", b.low}, {"high", b.high}, {"count", b.count}});
  return out;
}

Json uncertainty_json(const costs::MonteCarloResult& r, const std::string& title, const std::string& file,
                      const std::vector<std::string>& cautions) {
  Json j;
  j["case"] = file;
  j["title"] = title;
  j["basis"] = r.base.basis_label;
  j["currency"] = r.base.currency;
  j["samples"] = r.samples;
  j["seed"] = r.seed;
  j["threads"] = r.threads;
  j["failed_samples"] = r.failed;
  j["first_failed_sample"] = r.first_failed_sample ? Json(*r.first_failed_sample) : Json(nullptr);
  j["first_error"] = r.failed ? Json(r.first_error) : Json(nullptr);
  Json parameters = Json::array();
  for (const auto& p : r.parameters) {
    Json item;
    item["path"] = p.path;
    item["label"] = p.label;
    item["unit"] = p.unit;
    item["distribution"] = costs::distribution_name(p.distribution.kind());
    item["description"] = p.distribution.describe();
    item["mean"] = p.distribution.mean();
    item["standard_deviation"] = p.distribution.standard_deviation();
    item["median"] = p.distribution.median();
    parameters.push_back(item);
  }
  j["parameters"] = parameters;
  j["base"] = study_figures_to_json(r.base);
  Json outputs = Json::object();
  for (const auto& s : r.outputs) {
    Json o;
    o["label"] = s.label;
    o["unit"] = s.unit;
    o["count"] = s.count;
    o["mean"] = s.mean;
    o["standard_deviation"] = s.standard_deviation;
    o["min"] = s.minimum;
    o["max"] = s.maximum;
    o["p10"] = s.p10;
    o["p50"] = s.p50;
    o["p90"] = s.p90;
    o["quantile_error"] = s.quantile_error;
    o["histogram"] = histogram_json(s.histogram);
    outputs[s.key] = o;
  }
  j["outputs"] = outputs;
  j["probability_npv_positive"] = r.probability_npv_positive ? Json(*r.probability_npv_positive) : Json(nullptr);
  j["cautions"] = cautions;
  return j;
}

void write_summary_csv(const std::string& folder, const costs::MonteCarloResult& r) {
  std::string text = "figure,unit,count,mean,standard_deviation,min,max,p10,p50,p90,quantile_error\n";
  for (const auto& s : r.outputs) {
    text += csv_field(study_figure_name(s.key, r.base.basis_label)) + "," + csv_field(s.unit) + "," +
            std::to_string(s.count);
    for (double v : {s.mean, s.standard_deviation, s.minimum, s.maximum, s.p10, s.p50, s.p90, s.quantile_error})
      text += "," + csv_number(v);
    text += "\n";
  }
  write_output_file((std::filesystem::path(folder) / "uncertainty.csv").string(), text);
}

// Streams one row per sample into a temporary file that becomes FILE only
// when every sample is written (conventions: written whole or not at all).
class SampleCsv {
 public:
  SampleCsv(const std::string& path, const std::vector<costs::UncertainParameter>& parameters)
      : file_(std::filesystem::path(path)), parameters_(parameters) {}

  void header(const costs::CaseFigures& base) {
    buffer_ = "sample,failed";
    for (const auto& p : parameters_) buffer_ += "," + csv_field(study_csv_heading(p.path, p.unit));
    for (const auto& f : base.figures)
      buffer_ += "," + csv_field(study_csv_heading(study_figure_name(f.key, base.basis_label), f.unit));
    buffer_ += ",error\n";
  }
  void row(const costs::SampleRecord& s) {
    buffer_ += std::to_string(s.index) + (s.failed ? ",1" : ",0");
    for (double v : s.inputs) buffer_ += "," + csv_number(v);
    for (const auto& v : s.outputs) buffer_ += "," + (v ? csv_number(*v) : std::string());
    buffer_ += "," + csv_field(s.error) + "\n";
    if (buffer_.size() > (1u << 16)) flush();
  }
  void commit() {
    flush();
    file_.commit();
  }

 private:
  AtomicFile file_;
  const std::vector<costs::UncertainParameter>& parameters_;
  std::string buffer_;
  void flush() {
    file_.write(buffer_);
    buffer_.clear();
  }
};

// A progress bar on standard error, drawn only on a terminal.
class ProgressBar {
 public:
  explicit ProgressBar(std::ostream& err) : err_(err), enabled_(isatty(STDERR_FILENO) == 1) {}
  void update(std::size_t done, std::size_t total) {
    if (!enabled_ || total == 0) return;
    constexpr std::size_t width = 30;
    const std::size_t filled = done * width / total;
    err_ << "\r[" << std::string(filled, '#') << std::string(width - filled, ' ') << "] "
         << fmt::format("{:3d}% {}/{} samples", static_cast<int>(100 * done / total), done, total) << std::flush;
    if (done == total) err_ << "\n";
  }

 private:
  std::ostream& err_;
  bool enabled_;
};

}  // namespace

CLI::App* add_uncertainty_command(CLI::App& parent, UncertaintyOptions& options) {
  CLI::App* command = parent.add_subcommand(
      "uncertainty", "Monte Carlo uncertainty of the key figures from the case's uncertainty section "
                     "(P10/P50/P90, histogram, probability that the NPV is positive)");
  command->add_option("CASE", options.case_file, "The case file (YAML) with an uncertainty section")
      ->required()
      ->type_name("FILE");
  command->add_option("-n,--samples", options.samples, "Number of samples (replaces uncertainty.samples)")
      ->type_name("N")
      ->check(CLI::Range(std::size_t{1}, std::size_t{1000000000}));
  command->add_option("--seed", options.seed, "Seed of the random numbers (replaces uncertainty.seed)")->type_name("S");
  command->add_option("-t,--threads", options.threads, "Threads to sample on (default: every core)")
      ->type_name("T")
      ->check(CLI::Range(1u, 1024u));
  command->add_option("--samples-csv", options.samples_csv,
                      "Write every sample (inputs and key figures) as one CSV row to FILE (written whole or not at "
                      "all)")
      ->type_name("FILE");
  command->add_option("-j,--json", options.json_file,
                      "Write the statistics as JSON to FILE; '-' writes them to standard output and the summary "
                      "to standard error")
      ->type_name("FILE|-");
  command->add_option("--csv", options.csv_folder, "Write uncertainty.csv (one row per figure) into FOLDER")
      ->type_name("FOLDER");
  add_override_option(*command, options.overrides);
  command->add_flag("-q,--quiet", options.quiet, "Do not print the summary");
  command->footer(
      "Examples:\n"
      "  unchain uncertainty cases/my_case.yaml --samples 10000 --seed 42\n"
      "  unchain uncertainty cases/my_case.yaml --json mc.json --samples-csv samples.csv --threads 2\n"
      "The same seed gives the same results whatever the thread count. A sample whose solve fails is counted "
      "and its first error shown; the run fails only when every sample fails.\n"
      "Exit codes: 0 done, 2 bad input, 3 every sample failed or the base case does not converge.");
  return command;
}

int run_uncertainty_command(const UncertaintyOptions& options, std::ostream& out, std::ostream& err) {
  const costs::PreparedCase prepared(options.case_file, parse_overrides(options.overrides));
  const costs::UncertaintySettings settings = costs::read_uncertainty_settings(prepared);
  const std::string title = document_title(prepared.document());
  const std::vector<std::string> cautions = study_cautions(document_block_types(prepared.document()));

  costs::MonteCarloOptions mc;
  mc.samples = options.samples;
  mc.seed = options.seed;
  mc.threads = options.threads;
  std::unique_ptr<SampleCsv> csv;
  if (!options.samples_csv.empty()) {
    csv = std::make_unique<SampleCsv>(options.samples_csv, settings.parameters);
    mc.on_start = [&](const costs::CaseFigures& base) { csv->header(base); };
    mc.on_sample = [&](const costs::SampleRecord& s) { csv->row(s); };
  }
  ProgressBar progress(err);
  mc.on_progress = [&](std::size_t done, std::size_t total) { progress.update(done, total); };

  const costs::MonteCarloResult result = costs::run_monte_carlo(prepared, settings, mc);

  const bool json_to_stdout = options.json_file == "-";
  std::ostream& text = json_to_stdout ? err : out;
  if (!options.quiet) {
    text << uncertainty_text(result, title, options.case_file);
    for (const auto& c : cautions) text << "\ncaution: " << c << "\n";
  }
  if (result.failed > 0)
    err << fmt::format("warning: {} of {} samples failed; the first (sample {}): {}\n", result.failed,
                       result.samples, *result.first_failed_sample, result.first_error);
  if (csv) {
    csv->commit();
    if (!options.quiet) text << "samples written to " << options.samples_csv << "\n";
  }
  if (!options.json_file.empty()) {
    write_output_file(options.json_file, uncertainty_json(result, title, options.case_file, cautions).dump(2) + "\n");
    if (!json_to_stdout && !options.quiet) text << "statistics written to " << options.json_file << "\n";
  }
  if (!options.csv_folder.empty()) {
    write_summary_csv(options.csv_folder, result);
    if (!options.quiet) text << "table written to " << options.csv_folder << "/uncertainty.csv\n";
  }
  return exit_success;
}

}  // namespace unchain::app
