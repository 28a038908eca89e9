// Output files are written whole or not at all (app/atomic_file.hpp).
#include <doctest/doctest.h>

#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "app/atomic_file.hpp"

namespace fs = std::filesystem;
using unchain::app::AtomicFile;
using unchain::app::OutputFileError;
using unchain::app::write_output_file;

namespace {

// A fresh, empty folder per test, removed afterwards.
struct ScratchFolder {
  fs::path path;
  ScratchFolder() {
    std::string pattern = (fs::temp_directory_path() / "unchain-atomic-XXXXXX").string();
    if (::mkdtemp(pattern.data()) == nullptr) throw std::runtime_error("mkdtemp failed");
    path = pattern;
  }
  ~ScratchFolder() {
    std::error_code ignored;
    fs::remove_all(path, ignored);
  }
  ScratchFolder(const ScratchFolder&) = delete;
  ScratchFolder& operator=(const ScratchFolder&) = delete;

  [[nodiscard]] std::size_t entries() const {
    std::size_t n = 0;
    for ([[maybe_unused]] const auto& entry : fs::directory_iterator(path)) ++n;
    return n;
  }
};

std::string read_all(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

void write_plain(const fs::path& p, const std::string& text) {
  std::ofstream out(p, std::ios::binary);
  out << text;
}

}  // namespace

TEST_CASE("atomic file: writes the whole content and leaves no temporary file") {
  ScratchFolder folder;
  const fs::path target = folder.path / "results.json";
  const std::string content = std::string(100000, 'x') + "\nend\n";  // several write() calls' worth
  write_output_file(target.string(), content);
  CHECK(read_all(target) == content);
  CHECK(folder.entries() == 1);
}

TEST_CASE("atomic file: replaces an existing file only on commit") {
  ScratchFolder folder;
  const fs::path target = folder.path / "results.json";
  write_plain(target, "old results\n");
  {
    AtomicFile file(target);
    // The temporary file sits next to the target, so the rename stays on
    // one file system.
    CHECK(file.temporary().parent_path() == target.parent_path());
    CHECK(file.temporary().filename().string().rfind("results.json.tmp.", 0) == 0);
    file.write("new ");
    CHECK(read_all(target) == "old results\n");  // not yet visible
    file.write("results\n");
    file.commit();
  }
  CHECK(read_all(target) == "new results\n");
  CHECK(folder.entries() == 1);
}

TEST_CASE("atomic file: an abandoned write leaves the old file intact and removes the temporary file") {
  ScratchFolder folder;
  const fs::path target = folder.path / "results.json";
  write_plain(target, "old results\n");
  try {
    AtomicFile file(target);
    file.write("{\"half\": ");
    CHECK(folder.entries() == 2);  // target and temporary
    throw std::runtime_error("the program failed while producing the results");
  } catch (const std::runtime_error&) {
  }
  CHECK(read_all(target) == "old results\n");
  CHECK(folder.entries() == 1);
}

TEST_CASE("atomic file: a failed rename leaves the target untouched and nothing behind") {
  ScratchFolder folder;
  // The target is an existing non-empty folder: rename(2) of a file onto it
  // fails (EISDIR), after the content has been written and flushed.
  const fs::path target = folder.path / "occupied";
  fs::create_directory(target);
  write_plain(target / "keep.txt", "kept\n");
  CHECK_THROWS_AS(write_output_file(target.string(), "content\n"), OutputFileError);
  CHECK(fs::is_directory(target));
  CHECK(read_all(target / "keep.txt") == "kept\n");
  CHECK(folder.entries() == 1);
}

TEST_CASE("atomic file: a missing folder is an error naming the path") {
  ScratchFolder folder;
  const fs::path target = folder.path / "no-such-folder" / "results.json";
  std::string message;
  try {
    write_output_file(target.string(), "content\n");
  } catch (const OutputFileError& e) {
    message = e.what();
  }
  CHECK(message.find(target.string()) != std::string::npos);
  CHECK(message.find("No such file or directory") != std::string::npos);
  CHECK_FALSE(fs::exists(target));
  CHECK(folder.entries() == 0);
}

TEST_CASE("atomic file: an empty file name is refused") {
  CHECK_THROWS_AS(write_output_file("", "content\n"), OutputFileError);
}
