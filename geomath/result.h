// A value or a reason why there is none. Cairn never answers with NaN or a
// silent guess: a computation that cannot give a number says why.
#pragma once
#include <optional>
#include <stdexcept>
#include <string>
#include <utility>

namespace cairn {

template <class T>
class Result {
 public:
  Result(T value) : value_(std::move(value)) {}  // NOLINT: implicit by design
  static Result failure(std::string why) {
    Result r;
    r.error_ = std::move(why);
    return r;
  }
  bool ok() const { return value_.has_value(); }
  explicit operator bool() const { return ok(); }
  const T& value() const {
    if (!value_) throw std::logic_error("Result has no value: " + error_);
    return *value_;
  }
  T& value() {
    if (!value_) throw std::logic_error("Result has no value: " + error_);
    return *value_;
  }
  const T& operator*() const { return value(); }
  const T* operator->() const { return &value(); }
  const std::string& error() const { return error_; }

 private:
  Result() = default;
  std::optional<T> value_;
  std::string error_;
};

}  // namespace cairn
