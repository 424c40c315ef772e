// HDF5 handle ownership and error-stack translation for the tables library.
#include "tables/hdf5_handle.h"

namespace edgelaw {

namespace {

// H5Ewalk visits from the innermost frame outward; the innermost frame says what went
// wrong at the bottom (e.g. "checksum failed"), which is the useful part for a user.
herr_t keep_innermost(unsigned n, const H5E_error2_t* err, void* data) {
  auto* out = static_cast<std::string*>(data);
  if (n == 0 && err && err->desc) *out = err->desc;
  return 0;
}

}  // namespace

std::string hdf5_error_reason() {
  std::string reason;
  H5Ewalk2(H5E_DEFAULT, H5E_WALK_UPWARD, keep_innermost, &reason);
  H5Eclear2(H5E_DEFAULT);
  // Keep messages on one line whatever HDF5 put in its description.
  for (char& c : reason)
    if (c == '\n' || c == '\r') c = ' ';
  return reason;
}

void Hdf5Handle::close() {
  if (id_ < 0) return;
  hid_t id = std::exchange(id_, H5I_INVALID_HID);
  herr_t status = -1;
  switch (H5Iget_type(id)) {
    case H5I_FILE: status = H5Fclose(id); break;
    case H5I_GROUP: status = H5Gclose(id); break;
    case H5I_DATASET: status = H5Dclose(id); break;
    case H5I_DATASPACE: status = H5Sclose(id); break;
    case H5I_DATATYPE: status = H5Tclose(id); break;
    case H5I_ATTR: status = H5Aclose(id); break;
    case H5I_GENPROP_LST: status = H5Pclose(id); break;
    default: status = H5Idec_ref(id); break;
  }
  h5_check(status, "H5?close");
}

void Hdf5Handle::reset() noexcept {
  try {
    close();
  } catch (...) {
  }
}

Hdf5QuietErrors::Hdf5QuietErrors() {
  H5Eget_auto2(H5E_DEFAULT, &old_func_, &old_data_);
  H5Eset_auto2(H5E_DEFAULT, nullptr, nullptr);
}

Hdf5QuietErrors::~Hdf5QuietErrors() { H5Eset_auto2(H5E_DEFAULT, old_func_, old_data_); }

}  // namespace edgelaw
