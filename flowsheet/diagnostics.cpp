#include "flowsheet/diagnostics.hpp"

#include <algorithm>

namespace unchain {

std::string SourceLocation::to_string() const {
  std::string out = file.empty() ? std::string("<input>") : file;
  if (line > 0) {
    out += ":" + std::to_string(line);
    if (column > 0) out += ":" + std::to_string(column);
  }
  return out;
}

std::string Diagnostic::to_string() const {
  return where.to_string() + (severity == Severity::error ? ": error: " : ": warning: ") + message;
}

namespace {
std::string join_messages(const std::vector<Diagnostic>& diagnostics) {
  std::string out;
  for (const auto& d : diagnostics) {
    if (!out.empty()) out += '\n';
    out += d.to_string();
  }
  return out;
}
}  // namespace

InputError::InputError(std::vector<Diagnostic> diagnostics)
    : std::runtime_error(join_messages(diagnostics)), diagnostics_(std::move(diagnostics)) {}

InputError::InputError(SourceLocation where, const std::string& message)
    : InputError(std::vector<Diagnostic>{Diagnostic{Severity::error, std::move(where), message}}) {}

void DiagnosticList::error(SourceLocation where, std::string message) {
  items_.push_back({Severity::error, std::move(where), std::move(message)});
}

void DiagnosticList::warning(SourceLocation where, std::string message) {
  items_.push_back({Severity::warning, std::move(where), std::move(message)});
}

bool DiagnosticList::has_errors() const {
  return std::any_of(items_.begin(), items_.end(),
                     [](const Diagnostic& d) { return d.severity == Severity::error; });
}

void DiagnosticList::throw_if_errors() const {
  std::vector<Diagnostic> errors;
  for (const auto& d : items_)
    if (d.severity == Severity::error) errors.push_back(d);
  if (!errors.empty()) throw InputError(std::move(errors));
}

Warnings::Warnings(const Warnings& other) {
  std::lock_guard lock(other.mutex_);
  messages_ = other.messages_;
  asked_ = other.asked_;
}

Warnings& Warnings::operator=(const Warnings& other) {
  if (this != &other) {
    std::vector<std::string> messages;
    std::vector<Asked> asked;
    {
      std::lock_guard lock(other.mutex_);
      messages = other.messages_;
      asked = other.asked_;
    }
    std::lock_guard lock(mutex_);
    messages_ = std::move(messages);
    asked_ = std::move(asked);
  }
  return *this;
}

bool Warnings::first_time(std::string_view subject, const char* topic, int variant) {
  std::lock_guard lock(mutex_);
  for (const Asked& a : asked_)
    if (a.topic == topic && a.variant == variant && a.subject == subject) return false;
  asked_.push_back({std::string(subject), topic, variant});
  return true;
}

void Warnings::add(std::string message) {
  std::lock_guard lock(mutex_);
  if (std::find(messages_.begin(), messages_.end(), message) == messages_.end())
    messages_.push_back(std::move(message));
}

std::vector<std::string> Warnings::messages() const {
  std::lock_guard lock(mutex_);
  return messages_;
}

std::size_t Warnings::size() const {
  std::lock_guard lock(mutex_);
  return messages_.size();
}

}  // namespace unchain
