#pragma once
// Errors and warnings with their place in the input.
//
// Messages read `FILE:LINE:COLUMN: error: WHAT (expected ..., found ...)`.
// Line and column are 1-based, as editors show them. Warnings are collected
// per solve (never in global state) so that many solves can run at once.

#include <cstddef>
#include <mutex>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace unchain {

struct SourceLocation {
  std::string file;   // empty when the value came from the command line or code
  int line = 0;       // 1-based; 0 when unknown
  int column = 0;     // 1-based; 0 when unknown

  [[nodiscard]] std::string to_string() const;  // "file:line:column" or the parts known
};

enum class Severity { error, warning };

struct Diagnostic {
  Severity severity = Severity::error;
  SourceLocation where;
  std::string message;

  [[nodiscard]] std::string to_string() const;  // "file:3:5: error: ..."
};

// Bad input: one or more diagnostics, exit code 2.
class InputError : public std::runtime_error {
 public:
  explicit InputError(std::vector<Diagnostic> diagnostics);
  InputError(SourceLocation where, const std::string& message);
  [[nodiscard]] const std::vector<Diagnostic>& diagnostics() const { return diagnostics_; }

 private:
  std::vector<Diagnostic> diagnostics_;
};

// A solve that did not converge or a balance that did not close: exit 3.
class ConvergenceError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

// A model that cannot do what it was asked (a heater that cannot reach its
// set-point, a yield table whose element balance cannot close): exit 2,
// because the input asks for the impossible, with the block named.
class ModelError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

// Collects errors so that several input mistakes are reported in one run.
class DiagnosticList {
 public:
  void error(SourceLocation where, std::string message);
  void warning(SourceLocation where, std::string message);
  [[nodiscard]] bool has_errors() const;
  [[nodiscard]] const std::vector<Diagnostic>& all() const { return items_; }
  // Throws InputError holding every error collected so far, if any.
  void throw_if_errors() const;

 private:
  std::vector<Diagnostic> items_;
};

// Warnings raised while solving (a correlation used outside its range, a
// poor solvent). Each distinct message is kept once. Thread-safe, so one
// sink may be shared by the threads of one solve; different solves use
// different sinks.
class Warnings {
 public:
  Warnings() = default;
  Warnings(const Warnings& other);
  Warnings& operator=(const Warnings& other);
  void add(std::string message);
  // True the first time (subject, topic, variant) is asked about, false
  // after. A caller whose message follows from those three alone (a
  // component, a correlation, a side of its range) asks first and formats
  // the message only once: a solve checks ranges hundreds of thousands of
  // times, nearly always with a message the sink already holds. `topic`
  // is compared by address, so pass a string literal.
  [[nodiscard]] bool first_time(std::string_view subject, const char* topic, int variant);
  [[nodiscard]] std::vector<std::string> messages() const;
  [[nodiscard]] std::size_t size() const;

 private:
  struct Asked {
    std::string subject;
    const char* topic;
    int variant;
  };
  mutable std::mutex mutex_;
  std::vector<std::string> messages_;
  std::vector<Asked> asked_;
};

}  // namespace unchain
