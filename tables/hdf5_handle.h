// Move-only owners for HDF5 identifiers and the one helper that turns HDF5 failures into exceptions.
#pragma once

#include <hdf5.h>

#include <stdexcept>
#include <string>
#include <utility>

namespace edgelaw {

// Base of everything the tables library throws; the message is always one line.
struct TableError : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// An HDF5 library call failed; the message names the call and HDF5's own innermost reason.
struct Hdf5Error : TableError {
  using TableError::TableError;
};

// HDF5's innermost error description on the current thread's stack ("" when empty).
std::string hdf5_error_reason();

// Throws Hdf5Error naming `call` when `status` is negative (HDF5's failure convention for
// herr_t, hid_t, htri_t and hssize_t alike); returns the status otherwise.
template <class Status>
Status h5_check(Status status, const char* call) {
  if (status < 0) {
    std::string reason = hdf5_error_reason();
    throw Hdf5Error(std::string("HDF5 call ") + call + " failed" +
                    (reason.empty() ? std::string() : ": " + reason));
  }
  return status;
}

// Owns one hid_t and closes it with the matching H5?close; empty state is H5I_INVALID_HID.
// Move-only, like fmt's buffered_file, so a handle is closed exactly once.
class Hdf5Handle {
 public:
  Hdf5Handle() = default;
  // Takes ownership of `id` after checking it (throws Hdf5Error naming `call` if invalid).
  Hdf5Handle(hid_t id, const char* call) : id_(h5_check(id, call)) {}
  Hdf5Handle(const Hdf5Handle&) = delete;
  Hdf5Handle& operator=(const Hdf5Handle&) = delete;
  Hdf5Handle(Hdf5Handle&& other) noexcept : id_(std::exchange(other.id_, H5I_INVALID_HID)) {}
  Hdf5Handle& operator=(Hdf5Handle&& other) noexcept {
    if (this != &other) {
      reset();
      id_ = std::exchange(other.id_, H5I_INVALID_HID);
    }
    return *this;
  }
  ~Hdf5Handle() { reset(); }

  hid_t get() const { return id_; }
  explicit operator bool() const { return id_ >= 0; }
  // Closes now and reports failure (destructors cannot); used for the file before fsync.
  void close();
  // Closes quietly; errors on this path are already being reported by someone else.
  void reset() noexcept;

 private:
  hid_t id_ = H5I_INVALID_HID;
};

// While alive, HDF5 prints nothing to stderr: failures become exceptions instead.
// Restores the previous handler on destruction (the setting is process-wide in HDF5).
class Hdf5QuietErrors {
 public:
  Hdf5QuietErrors();
  ~Hdf5QuietErrors();
  Hdf5QuietErrors(const Hdf5QuietErrors&) = delete;
  Hdf5QuietErrors& operator=(const Hdf5QuietErrors&) = delete;

 private:
  H5E_auto2_t old_func_ = nullptr;
  void* old_data_ = nullptr;
};

}  // namespace edgelaw
