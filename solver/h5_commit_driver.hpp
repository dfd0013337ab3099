#pragma once
// The ordered-commit HDF5 file driver (HDF5 1.10 virtual file layer) under H5Writer: why it
// exists and the order it commits in are explained in solver/h5_writer.hpp; its .cpp is the
// mechanism. Only H5Writer uses it.
#include <hdf5.h>

namespace hawser {

/// The driver's configuration, given to H5Pset_driver with commit_driver().
struct CommitDriverConfig {
  hbool_t sync;  // fdatasync between commit steps
};

/// Registers the driver (once per process, again if the library was reset) and returns its id.
hid_t commit_driver();

}  // namespace hawser
