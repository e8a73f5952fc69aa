// Status and Result<T>: errors as values at every boundary (config, CLI, HDF5,
// block Create()). A message names the file/key, the offending value and the
// rule, e.g. "configs/qpsk.ini: sweep.stop_bit_errors = -3: must be > 0".
#ifndef CAPGAP_BLOCKS_CORE_STATUS_H_
#define CAPGAP_BLOCKS_CORE_STATUS_H_

#include <optional>
#include <string>
#include <utility>

namespace capgap {

class [[nodiscard]] Status {
 public:
  Status() = default;  // OK
  static Status Ok() { return Status(); }
  static Status Error(std::string message) {
    Status s;
    s.ok_ = false;
    s.message_ = std::move(message);
    return s;
  }
  // A long computation (e.g. a code construction) gave up because its stop
  // flag was set: not an error of its input. Callers that add context to a
  // message keep the kind (WithPrefix); a run turns it into "stopped"
  // (exit 75), not into a failure.
  static Status Stopped(std::string message) {
    Status s = Error(std::move(message));
    s.stopped_ = true;
    return s;
  }
  bool ok() const { return ok_; }
  bool stopped() const { return stopped_; }
  const std::string& message() const { return message_; }
  // The same status with `prefix` put before its message (OK stays OK).
  Status WithPrefix(const std::string& prefix) const {
    if (ok_) return *this;
    Status s = *this;
    s.message_ = prefix + message_;
    return s;
  }

 private:
  bool ok_ = true;
  bool stopped_ = false;
  std::string message_;
};

// Either a value or an error Status. Access value() only when ok().
template <typename T>
class [[nodiscard]] Result {
 public:
  Result(T value) : value_(std::move(value)) {}  // NOLINT: implicit by design
  Result(Status status) : status_(std::move(status)) {}  // NOLINT
  bool ok() const { return status_.ok(); }
  const Status& status() const { return status_; }
  T& value() & { return *value_; }
  const T& value() const& { return *value_; }
  T&& value() && { return std::move(*value_); }

 private:
  Status status_;
  std::optional<T> value_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CORE_STATUS_H_
