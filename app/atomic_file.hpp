#pragma once
// Output files written whole or not at all.
//
// The content goes to a temporary file "FILE.tmp.XXXXXX" in the same
// folder (so that the final rename stays on one file system and is atomic),
// is flushed to disk, and only then renamed over FILE. If anything fails on
// the way, the temporary file is removed and an existing FILE is left as it
// was: a reader never sees half a results file.

#include <filesystem>
#include <stdexcept>
#include <string>
#include <string_view>

namespace unchain::app {

// An output file that cannot be written. The message names the path and the
// reason; the program exits with code 2 (the path given is bad input).
class OutputFileError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

// A temporary file that becomes `target` on commit(). Destroying it without
// commit() removes the temporary file and leaves `target` untouched.
class AtomicFile {
 public:
  explicit AtomicFile(std::filesystem::path target);
  ~AtomicFile();
  AtomicFile(const AtomicFile&) = delete;
  AtomicFile& operator=(const AtomicFile&) = delete;

  // Appends to the temporary file; throws OutputFileError on failure.
  void write(std::string_view data);
  // Flushes to disk and renames onto the target; throws OutputFileError on
  // failure (the temporary file is then removed).
  void commit();

  [[nodiscard]] const std::filesystem::path& target() const { return target_; }
  [[nodiscard]] const std::filesystem::path& temporary() const { return temporary_; }

 private:
  std::filesystem::path target_;
  std::filesystem::path temporary_;
  int descriptor_ = -1;
  bool committed_ = false;

  void discard() noexcept;
  [[noreturn]] void fail(const std::string& what, int error_number);
};

// Writes `content` to `path` atomically; the path "-" means standard output.
void write_output_file(const std::string& path, std::string_view content);

}  // namespace unchain::app
