// Bounded reader of regular files (see file_read.h).
#include "blocks/core/file_read.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstring>

namespace capgap {
namespace {

std::string FileKind(mode_t mode) {
  if (S_ISFIFO(mode)) return "a FIFO";
  if (S_ISCHR(mode)) return "a character device";
  if (S_ISBLK(mode)) return "a block device";
  if (S_ISSOCK(mode)) return "a socket";
  return "not a plain file";
}

// "" when `st` is a regular file within the limit, else the refusal.
std::string RefusalFor(const struct stat& st, std::uint64_t max_bytes, std::string_view noun) {
  if (S_ISDIR(st.st_mode)) return "is a directory, not a " + std::string(noun);
  if (!S_ISREG(st.st_mode)) return "is not a regular file (" + FileKind(st.st_mode) + ")";
  if (static_cast<std::uint64_t>(st.st_size) > max_bytes) {
    return "is " + std::to_string(st.st_size) + " bytes; a " + std::string(noun) +
           " may have at most " + std::to_string(max_bytes) + " bytes";
  }
  return "";
}

// Closes a descriptor on every return path.
class FdCloser {
 public:
  explicit FdCloser(int fd) : fd_(fd) {}
  ~FdCloser() { ::close(fd_); }
  FdCloser(const FdCloser&) = delete;
  FdCloser& operator=(const FdCloser&) = delete;

 private:
  int fd_;
};

}  // namespace

Status CheckRegularFile(const std::string& path, std::uint64_t max_bytes, std::string_view noun,
                        std::string_view open_noun) {
  const std::string cannot_open =
      path + ": cannot open " + std::string(open_noun.empty() ? noun : open_noun);
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0) return Status::Error(cannot_open);
  if (std::string refusal = RefusalFor(st, max_bytes, noun); !refusal.empty()) {
    return Status::Error(path + ": " + refusal);
  }
  return Status::Ok();
}

Result<std::string> ReadRegularFile(const std::string& path, std::uint64_t max_bytes,
                                    std::string_view noun, std::string_view open_noun) {
  const auto fail = [&](const std::string& rule) { return Status::Error(path + ": " + rule); };
  if (Status s = CheckRegularFile(path, max_bytes, noun, open_noun); !s.ok()) return s;
  const std::string cannot_open =
      "cannot open " + std::string(open_noun.empty() ? noun : open_noun);
  // O_NONBLOCK: should the path have become a FIFO since stat(), open()
  // returns at once instead of waiting for a writer; fstat() then refuses it.
  const int fd = ::open(path.c_str(), O_RDONLY | O_NONBLOCK | O_CLOEXEC);
  if (fd < 0) return fail(cannot_open);
  FdCloser closer(fd);
  struct stat st {};
  if (::fstat(fd, &st) != 0) return fail(cannot_open);
  if (std::string refusal = RefusalFor(st, max_bytes, noun); !refusal.empty()) return fail(refusal);
  std::string bytes;
  bytes.reserve(static_cast<std::size_t>(st.st_size));
  char buf[65536];
  while (bytes.size() <= max_bytes) {
    const std::uint64_t want = std::min<std::uint64_t>(sizeof buf, max_bytes + 1 - bytes.size());
    const ssize_t n = ::read(fd, buf, static_cast<std::size_t>(want));
    if (n < 0) {
      if (errno == EINTR) continue;
      return fail(std::string("read error: ") + std::strerror(errno));
    }
    if (n == 0) break;
    bytes.append(buf, static_cast<std::size_t>(n));
  }
  if (bytes.size() > max_bytes) {
    return fail("grew beyond " + std::to_string(max_bytes) + " bytes while being read; a " +
                std::string(noun) + " may have at most " + std::to_string(max_bytes) + " bytes");
  }
  return bytes;
}

}  // namespace capgap
