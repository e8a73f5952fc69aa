// Crash-safe file replacement with POSIX calls (open/write/fsync/rename).
#include "sim/io/atomic_file.h"

#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>

namespace capgap {
namespace {

namespace fs = std::filesystem;

std::string Errno() { return std::strerror(errno); }

std::string DirectoryOf(const std::string& path) {
  const fs::path parent = fs::path(path).parent_path();
  return parent.empty() ? std::string(".") : parent.string();
}

// fsync of an open descriptor, retried on EINTR (a signal may arrive while a
// checkpoint is being written).
bool Sync(int fd) {
  while (::fsync(fd) != 0) {
    if (errno != EINTR) return false;
  }
  return true;
}

// rename(tmp, path) then fsync of the directory; `tmp` is already on disk.
Status RenameAndSyncDirectory(const std::string& tmp, const std::string& path) {
  if (std::rename(tmp.c_str(), path.c_str()) != 0) {
    const std::string why = Errno();
    std::remove(tmp.c_str());
    return Status::Error(path + ": cannot rename temporary file: " + why);
  }
  // Make the rename itself durable. A directory that cannot be opened or
  // synced (some network file systems) leaves the new file in place; only its
  // durability across a power loss is then up to the file system.
  const int dir = ::open(DirectoryOf(path).c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (dir >= 0) {
    Sync(dir);
    ::close(dir);
  }
  return Status::Ok();
}

}  // namespace

std::string TemporaryPathFor(const std::string& path) {
  return path + ".tmp-" + std::to_string(::getpid());
}

Status CommitFile(const std::string& tmp, const std::string& path) {
  const int fd = ::open(tmp.c_str(), O_RDONLY | O_CLOEXEC);
  if (fd < 0) {
    const std::string why = Errno();
    std::remove(tmp.c_str());
    return Status::Error(path + ": cannot reopen temporary file " + tmp + ": " + why);
  }
  const bool synced = Sync(fd);
  const std::string sync_error = synced ? "" : Errno();
  ::close(fd);
  if (!synced) {
    std::remove(tmp.c_str());
    return Status::Error(path + ": fsync failed: " + sync_error);
  }
  return RenameAndSyncDirectory(tmp, path);
}

Status WriteFileAtomically(const std::string& path, const std::string& bytes) {
  const std::string tmp = TemporaryPathFor(path);
  const int fd = ::open(tmp.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0644);
  if (fd < 0) return Status::Error(path + ": cannot create " + tmp + ": " + Errno());
  std::size_t done = 0;
  while (done < bytes.size()) {
    const ssize_t n = ::write(fd, bytes.data() + done, bytes.size() - done);
    if (n < 0) {
      if (errno == EINTR) continue;
      const std::string why = Errno();
      ::close(fd);
      std::remove(tmp.c_str());
      return Status::Error(path + ": write failed: " + why);
    }
    done += static_cast<std::size_t>(n);
  }
  const bool synced = Sync(fd);
  const std::string sync_error = synced ? "" : Errno();
  if (::close(fd) != 0 || !synced) {
    std::remove(tmp.c_str());
    return Status::Error(path + ": cannot flush " + tmp + ": " + (synced ? Errno() : sync_error));
  }
  return RenameAndSyncDirectory(tmp, path);
}

void RemoveStaleTemporaries(const std::string& path) {
  std::error_code ec;
  const fs::path target(path);
  const std::string prefix = target.filename().string() + ".tmp-";
  const fs::path dir = target.has_parent_path() ? target.parent_path() : fs::path(".");
  for (fs::directory_iterator it(dir, ec), end; !ec && it != end; it.increment(ec)) {
    const std::string name = it->path().filename().string();
    if (name.rfind(prefix, 0) == 0) fs::remove(it->path(), ec);
  }
}

}  // namespace capgap
