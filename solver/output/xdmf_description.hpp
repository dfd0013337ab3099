#pragma once
// XDMF (eXtensible Data Model and Format, version 3 XML; xdmf.org) description of a result
// file, so that ParaView and VisIt open a run as a time series of polylines: the output nodes
// as points (/nodes/position row by row), joined in order by straight segments
// (/nodes/polyline), velocity as a point field; when every node is kept, the segments are the
// elements and carry tension [N], stress = T / A [Pa] and safety factor = sigma_u A / T [-]
// as cell fields (XDMF Function items over /elements/tension and /mesh/element_area). The
// description only refers to datasets of the HDF5 file; it holds no data of its own.
#include <string>

namespace hawser {

struct XdmfContent {
  std::string h5_name;            // the result file's name, relative to the .xmf's folder
  std::size_t rows = 0;           // outputs (time steps) in the file
  std::size_t points = 0;         // output nodes per row
  std::size_t elements = 0;       // elements of the tether (cell fields only if points = elements + 1)
  double ultimate_strength_pa = 0.0;
  const double* times_s = nullptr;  // `rows` output times
};

/// The XML text.
std::string xdmf_text(const XdmfContent& c);

/// Writes the text to `path` atomically (a temporary file renamed over it); LibraryError
/// naming the path on failure.
void write_xdmf(const std::string& path, const XdmfContent& c);

}  // namespace hawser
