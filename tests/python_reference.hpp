#pragma once
// Runs a short script under Debian's /usr/bin/python3 (which sees
// python3-iapws, python3-pint, python3-periodictable, numpy and scipy) and
// returns the numbers it prints, one per whitespace-separated token. Used
// to compare against general-purpose reference libraries at test time.

#include <array>
#include <cstdio>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#ifndef UNCHAIN_PYTHON
#define UNCHAIN_PYTHON "/usr/bin/python3"
#endif

namespace unchain::testing {

inline std::vector<double> python_numbers(const std::string& script) {
  // The script goes through a here-document so that quotes need no escaping.
  const std::string command = std::string(UNCHAIN_PYTHON) + " - <<'UNCHAIN_PY'\n" + script + "\nUNCHAIN_PY\n";
  FILE* pipe = popen(command.c_str(), "r");
  if (pipe == nullptr) throw std::runtime_error("cannot start " UNCHAIN_PYTHON);
  std::string output;
  std::array<char, 4096> buffer{};
  while (std::fgets(buffer.data(), static_cast<int>(buffer.size()), pipe) != nullptr) output += buffer.data();
  const int status = pclose(pipe);
  if (status != 0) throw std::runtime_error("reference script failed (status " + std::to_string(status) + "):\n" + script);
  std::vector<double> numbers;
  std::istringstream in(output);
  double value = 0.0;
  while (in >> value) numbers.push_back(value);
  return numbers;
}

}  // namespace unchain::testing
