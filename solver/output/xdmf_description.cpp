#include "solver/output/xdmf_description.hpp"

#include <cstdio>
#include <fstream>
#include <sstream>

#include "solver/input/errors.hpp"
#include "solver/output/h5_handles.hpp"

namespace hawser {
namespace {

// Row `t` of a (rows, width...) series as an XDMF hyperslab of dimensions `dims`.
std::string row_slab(const XdmfContent& c, const std::string& dataset, std::size_t t,
                     std::size_t width, bool vector) {
  std::ostringstream s;
  const std::string dims = std::to_string(width) + (vector ? " 3" : "");
  const std::string whole =
      std::to_string(c.rows) + " " + std::to_string(width) + (vector ? " 3" : "");
  s << "<DataItem ItemType=\"HyperSlab\" Dimensions=\"" << dims << "\">"
    << "<DataItem Dimensions=\"3 " << (vector ? 3 : 2) << "\" Format=\"XML\">";
  if (vector)
    s << t << " 0 0 1 1 1 1 " << width << " 3";
  else
    s << t << " 0 1 1 1 " << width;
  s << "</DataItem><DataItem Dimensions=\"" << whole << "\" NumberType=\"Float\" Precision=\"8\""
    << " Format=\"HDF\">" << c.h5_name << ":" << dataset << "</DataItem></DataItem>";
  return s.str();
}

}  // namespace

std::string xdmf_text(const XdmfContent& c) {
  std::ostringstream x;
  x.precision(17);
  const std::size_t segments = c.points > 0 ? c.points - 1 : 0;
  const bool cells = c.points == c.elements + 1 && c.elements > 0;
  const std::string area = "<DataItem Dimensions=\"" + std::to_string(c.elements) +
                           "\" NumberType=\"Float\" Precision=\"8\" Format=\"HDF\">" + c.h5_name +
                           ":/mesh/element_area</DataItem>";
  x << "<?xml version=\"1.0\" ?>\n<Xdmf Version=\"3.0\">\n <Domain>\n"
    << "  <Grid Name=\"tether\" GridType=\"Collection\" CollectionType=\"Temporal\">\n";
  for (std::size_t t = 0; t < c.rows; ++t) {
    x << "   <Grid Name=\"output " << t << "\" GridType=\"Uniform\">\n"
      << "    <Time Value=\"" << c.times_s[t] << "\"/>\n"
      << "    <Topology TopologyType=\"Polyline\" NodesPerElement=\"2\" NumberOfElements=\""
      << segments << "\"><DataItem Dimensions=\"" << segments
      << " 2\" NumberType=\"Int\" Precision=\"8\" Format=\"HDF\">" << c.h5_name
      << ":/nodes/polyline</DataItem></Topology>\n"
      << "    <Geometry GeometryType=\"XYZ\">" << row_slab(c, "/nodes/position", t, c.points, true)
      << "</Geometry>\n"
      << "    <Attribute Name=\"velocity [m/s]\" AttributeType=\"Vector\" Center=\"Node\">"
      << row_slab(c, "/nodes/velocity", t, c.points, true) << "</Attribute>\n";
    if (cells) {
      const std::string tension = row_slab(c, "/elements/tension", t, c.elements, false);
      x << "    <Attribute Name=\"tension [N]\" AttributeType=\"Scalar\" Center=\"Cell\">"
        << tension << "</Attribute>\n"
        << "    <Attribute Name=\"stress [Pa]\" AttributeType=\"Scalar\" Center=\"Cell\">"
        << "<DataItem ItemType=\"Function\" Function=\"$0 / $1\" Dimensions=\"" << c.elements
        << "\">" << tension << area << "</DataItem></Attribute>\n"
        << "    <Attribute Name=\"safety factor [-]\" AttributeType=\"Scalar\" Center=\"Cell\">"
        << "<DataItem ItemType=\"Function\" Function=\"" << c.ultimate_strength_pa
        << " * $1 / $0\" Dimensions=\"" << c.elements << "\">" << tension << area
        << "</DataItem></Attribute>\n";
    }
    x << "   </Grid>\n";
  }
  x << "  </Grid>\n </Domain>\n</Xdmf>\n";
  return x.str();
}

void write_xdmf(const std::string& path, const XdmfContent& c) {
  const std::string tmp = path + ".tmp";
  {
    std::ofstream out(tmp, std::ios::binary | std::ios::trunc);
    out << xdmf_text(c);
    out.close();
    if (!out) throw LibraryError(errno_text("write", tmp));
  }
  if (std::rename(tmp.c_str(), path.c_str()) != 0) throw LibraryError(errno_text("rename to", path));
}

}  // namespace hawser
