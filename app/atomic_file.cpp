#include "app/atomic_file.hpp"

#include <fcntl.h>
#include <stdlib.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <fstream>
#include <iostream>
#include <vector>

namespace unchain::app {

namespace {

std::string describe_errno(int error_number) { return std::strerror(error_number); }

// The process umask, read without changing it (umask(2) can only be read by
// setting it, which would race with other threads creating files).
mode_t current_umask() {
  std::ifstream status("/proc/self/status");
  std::string line;
  while (std::getline(status, line)) {
    if (line.rfind("Umask:", 0) == 0) {
      try {
        return static_cast<mode_t>(std::stoul(line.substr(6), nullptr, 8));
      } catch (const std::exception&) {
        break;
      }
    }
  }
  return 022;  // the usual default
}

}  // namespace

AtomicFile::AtomicFile(std::filesystem::path target) : target_(std::move(target)) {
  if (target_.empty()) throw OutputFileError("cannot write output: empty file name");
  // mkstemp wants a writable template ending in XXXXXX; it creates the file
  // with mode 0600 and O_EXCL, so two runs never share a temporary file.
  std::string pattern = target_.string() + ".tmp.XXXXXX";
  std::vector<char> buffer(pattern.begin(), pattern.end());
  buffer.push_back('\0');
  descriptor_ = ::mkstemp(buffer.data());
  if (descriptor_ < 0) {
    const int error_number = errno;
    throw OutputFileError("cannot write '" + target_.string() + "': cannot create a file in '" +
                          (target_.has_parent_path() ? target_.parent_path().string() : std::string(".")) +
                          "' (" + describe_errno(error_number) + ")");
  }
  temporary_ = std::filesystem::path(buffer.data());
  // Results files are ordinary documents: give them the permissions a
  // newly created file would get under the user's umask, not mkstemp's 0600.
  if (::fchmod(descriptor_, static_cast<mode_t>(0666 & ~current_umask())) != 0) {
    // Not fatal: the file is still written, only with owner-only access.
  }
}

AtomicFile::~AtomicFile() {
  if (!committed_) discard();
}

void AtomicFile::discard() noexcept {
  if (descriptor_ >= 0) {
    ::close(descriptor_);
    descriptor_ = -1;
  }
  if (!temporary_.empty()) {
    ::unlink(temporary_.c_str());
    temporary_.clear();
  }
}

void AtomicFile::fail(const std::string& what, int error_number) {
  discard();
  throw OutputFileError("cannot write '" + target_.string() + "': " + what + " (" + describe_errno(error_number) +
                        "); the file was not changed");
}

void AtomicFile::write(std::string_view data) {
  if (descriptor_ < 0) throw OutputFileError("cannot write '" + target_.string() + "': file already closed");
  while (!data.empty()) {
    const ssize_t written = ::write(descriptor_, data.data(), data.size());
    if (written < 0) {
      if (errno == EINTR) continue;
      fail("write failed", errno);
    }
    data.remove_prefix(static_cast<std::size_t>(written));
  }
}

void AtomicFile::commit() {
  if (descriptor_ < 0) throw OutputFileError("cannot write '" + target_.string() + "': file already closed");
  // fsync before rename: otherwise a crash shortly after could leave the
  // new name pointing at an empty file on some file systems.
  if (::fsync(descriptor_) != 0) fail("flushing to disk failed", errno);
  const int descriptor = descriptor_;
  descriptor_ = -1;
  if (::close(descriptor) != 0) fail("closing failed", errno);
  if (std::rename(temporary_.c_str(), target_.c_str()) != 0) fail("renaming the temporary file failed", errno);
  committed_ = true;
  temporary_.clear();
}

void write_output_file(const std::string& path, std::string_view content) {
  if (path == "-") {
    std::cout << content;
    std::cout.flush();
    if (!std::cout) throw OutputFileError("cannot write to standard output");
    return;
  }
  AtomicFile file{std::filesystem::path(path)};
  file.write(content);
  file.commit();
}

}  // namespace unchain::app
