#include "src/io/atomic_file.hpp"

#include <fcntl.h>
#include <signal.h>
#include <sys/stat.h>
#include <unistd.h>

#include <atomic>
#include <cerrno>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <system_error>

#include "src/io/input_error.hpp"

namespace spreadfit::io {

namespace {

namespace fs = std::filesystem;

/// Names tried for the temporary file before giving up (each taken name means a leftover or a concurrent writer).
constexpr int kMaxNameAttempts = 100;

/// Distinguishes the temporary files of successive calls in one process.
std::atomic<unsigned long> temporary_counter{0};

[[noreturn]] void fail(const fs::path& file, const std::string& message) {
  throw InputError(file.string(), 0, "", message);
}

std::string reason(int error) { return std::generic_category().message(error); }

/// Removes the temporary files of `target` that a killed process left (".NAME.tmp-PID-N" whose PID no longer runs):
/// a kill between creating and renaming is the one case the destructor below cannot clean up. Best effort.
void remove_leftovers(const fs::path& target, const fs::path& folder) {
  std::string prefix(1, '.');
  prefix.append(target.filename().string()).append(".tmp-");
  std::error_code ec;
  for (fs::directory_iterator it(folder, ec), end; !ec && it != end; it.increment(ec)) {
    const std::string name = it->path().filename().string();
    if (name.rfind(prefix, 0) != 0) continue;
    const std::size_t dash = name.find('-', prefix.size());
    if (dash == std::string::npos) continue;
    char* stop = nullptr;
    const long pid = std::strtol(name.c_str() + prefix.size(), &stop, 10);
    if (stop != name.c_str() + dash || pid <= 0 || pid == ::getpid()) continue;
    if (::kill(static_cast<pid_t>(pid), 0) != 0 && errno == ESRCH) {
      std::error_code ignored;
      fs::remove(it->path(), ignored);
    }
  }
}

/// The temporary file: an open descriptor and a name, both released on destruction unless committed.
class TemporaryFile {
 public:
  TemporaryFile(const fs::path& target, const fs::path& folder) : target_(target) {
    const std::string in_folder = " (creating a temporary file in folder '" + folder.string() + "')";
    // Built by appending: GCC 12 gives a false -Wrestrict on "." + std::string.
    std::string stem(1, '.');
    stem.append(target.filename().string()).append(".tmp-").append(std::to_string(::getpid())).push_back('-');
    for (int attempt = 0; attempt < kMaxNameAttempts; ++attempt) {
      path_ = folder / (stem + std::to_string(temporary_counter.fetch_add(1)));
      // O_EXCL: never reuse or follow an existing name; 0666 less the umask, as any new file.
      fd_ = ::open(path_.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
      if (fd_ >= 0) return;
      if (errno != EEXIST) fail(target_, "cannot write: " + reason(errno) + in_folder);
    }
    fail(target_, "cannot write: no free temporary name in " + std::to_string(kMaxNameAttempts) +
                      " attempts (expected the folder to hold fewer leftover '" + stem + "*' files)");
  }

  ~TemporaryFile() {
    if (fd_ >= 0) ::close(fd_);
    if (!committed_) {
      std::error_code ignored;
      fs::remove(path_, ignored);
    }
  }

  TemporaryFile(const TemporaryFile&) = delete;
  TemporaryFile& operator=(const TemporaryFile&) = delete;

  void write_all(std::string_view contents) {
    const char* data = contents.data();
    std::size_t left = contents.size();
    while (left > 0) {  // each pass writes at least one byte or fails, so at most contents.size() passes
      const ssize_t written = ::write(fd_, data, left);
      if (written < 0) {
        if (errno == EINTR) continue;
        fail(target_, "cannot write: " + reason(errno));
      }
      data += written;
      left -= static_cast<std::size_t>(written);
    }
  }

  /// Gives the new file the permission bits of the one it replaces.
  void keep_mode_of(const struct stat& old) {
    if (::fchmod(fd_, old.st_mode & 07777) != 0) fail(target_, "cannot write: " + reason(errno));
  }

  /// Flushes to the disk, closes and renames over the target.
  void commit() {
    if (::fsync(fd_) != 0) fail(target_, "cannot write: " + reason(errno));
    const int fd = fd_;
    fd_ = -1;
    if (::close(fd) != 0) fail(target_, "cannot write: " + reason(errno));
    if (std::rename(path_.c_str(), target_.c_str()) != 0) {
      const int error = errno;
      if (error == EISDIR || error == ENOTEMPTY || error == EEXIST)
        fail(target_, "cannot write: it is a folder (expected a file name)");
      fail(target_, "cannot write: " + reason(error));
    }
    committed_ = true;
  }

 private:
  fs::path target_;
  fs::path path_;
  int fd_ = -1;
  bool committed_ = false;
};

/// Makes a completed rename durable (the folder's entry on the disk); best effort, as the file itself is whole.
void sync_folder(const fs::path& folder) {
  const int fd = ::open(folder.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (fd < 0) return;
  ::fsync(fd);
  ::close(fd);
}

}  // namespace

void write_file_atomically(const fs::path& file, std::string_view contents) {
  if (file.empty()) fail(file, "cannot write: empty file name (expected a file path such as out/result.json)");
  if (!file.has_filename())
    fail(file, "cannot write: the path ends in a separator (expected a file name, such as out/result.json)");
  const fs::path folder = file.has_parent_path() ? file.parent_path() : fs::path(".");

  std::error_code ec;
  const fs::file_status folder_status = fs::status(folder, ec);
  if (!fs::exists(folder_status))
    fail(file, "cannot write: folder '" + folder.string() +
                   "' does not exist (expected an existing folder; it is "
                   "not created)");
  if (!fs::is_directory(folder_status))
    fail(file, "cannot write: '" + folder.string() + "' is not a folder (expected the path of a folder before '" +
                   file.filename().string() + "')");
  if (fs::is_directory(fs::status(file, ec))) fail(file, "cannot write: it is a folder (expected a file name)");

  remove_leftovers(file, folder);
  TemporaryFile temporary(file, folder);
  temporary.write_all(contents);
  struct stat old {};
  if (::stat(file.c_str(), &old) == 0 && S_ISREG(old.st_mode)) temporary.keep_mode_of(old);
  temporary.commit();
  sync_folder(folder);
}

}  // namespace spreadfit::io
