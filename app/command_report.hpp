#pragma once
// `unchain report CASE -o FILE.html`: solves and costs a case, as `run`
// does, and writes one self-contained HTML report (report_html.hpp). When
// the case has `scale`, `sensitivity` or `uncertainty` sections, the report
// also holds the scale ladder, the tornado charts and the Monte Carlo
// histogram, computed by the study engines in costs/.

#include <CLI/CLI.hpp>

#include <cstddef>
#include <iosfwd>
#include <string>
#include <vector>

namespace unchain::app {

struct ReportOptions {
  std::string case_file;
  std::string output_file;  // the HTML file; "-" writes it to standard output
  std::vector<std::string> overrides;
  bool quiet = false;
  bool skip_studies = false;            // leave out the scale, sensitivity and Monte Carlo sections
  std::size_t monte_carlo_samples = 0;  // 0: the case's uncertainty.samples
  unsigned threads = 0;                 // for the studies; 0: every core
};

CLI::App* add_report_command(CLI::App& parent, ReportOptions& options);
int run_report_command(const ReportOptions& options, std::ostream& out, std::ostream& err);

}  // namespace unchain::app
