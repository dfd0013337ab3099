#pragma once
// Writes a run to the HDF5 result file whose layout config/result_layout.yaml states (its
// format_version; ResultLayout gives every unit written, and refuses a path it does not list):
// static datasets (mesh, equilibrium, the scenario as run) at the start, time histories
// appended as the run goes and published at every flush, the summary at the end. The root
// attribute `status` is "running" until finish() writes "complete", "stopped" or "failed", so
// a file left by a killed run never looks complete.
//
// Resuming: every flush also stores /checkpoint (the state at the last output, the next
// output's index, the summary so far, the models' running peaks). A killed run's file holds
// it; `hawser run --resume FILE` reads it back (read_resume_point) and a recorder made with
// that point continues the same file. A finished file has no /checkpoint.
//
// Beside the result file, `<name>.xmf` describes the tether as a time series of polylines for
// ParaView and VisIt (xdmf_description.hpp), rewritten at every flush.
#include <memory>
#include <string>
#include <vector>

#include "solver/output/h5_writer.hpp"
#include "solver/output/result_layout.hpp"
#include "solver/integration/simulation.hpp"

namespace hawser {

/// What a killed run left to continue from.
struct ResumePoint {
  RunCheckpoint checkpoint;
  std::vector<double> model_peaks;  // the recorder's running peaks, in series order
  std::string scenario_text;        // /input/scenario: the run must be the same
  std::vector<double> times_s;      // /time so far (for the .xmf)
};

/// Reads the checkpoint of the result file at `path`; InputError (naming the file) when it
/// has none (a finished run, or not a hawser result file).
ResumePoint read_resume_point(const std::string& path);

class ResultRecorder : public OutputSink {
 public:
  /// A new file at `path`; with `resume`, the killed run's file at `path` is continued.
  ResultRecorder(const std::string& path, const Scenario& scenario, const TetherModel& model,
                 std::vector<std::size_t> nodes, const ResumePoint* resume = nullptr);
  void record(double t_s, const Matrix3X& x, const Matrix3X& v, const TetherDiagnostics& d) override;
  void checkpoint(const RunCheckpoint& c) override;
  void flush() override;
  /// Writes /summary and the final status, and closes the file.
  void finish(const RunSummary& summary);

 private:
  struct ModelSeries {
    const ForceModel* model;
    std::vector<OutputField> fields;
    std::vector<H5Writer::SeriesId> ids;
    std::vector<double> peaks;  // largest |value| per field
  };
  void write_fixed(const Scenario& scenario, const TetherModel& model);
  void write_resolved(const Scenario& scenario);  // /planet, /material, /events
  // Writers that take the units from the layout.
  void array(const std::string& path, const std::vector<hsize_t>& dims, const double* data);
  void array(const std::string& path, const std::vector<hsize_t>& dims, const long long* data);
  H5Writer::SeriesId series(const std::string& path, const std::vector<hsize_t>& dims);
  void value(const std::string& group, const std::string& name, double number);
  void value(const std::string& group, const std::string& name, long long number);
  void value(const std::string& group, const std::string& name, const std::string& text);
  double element_altitude_m(std::size_t element) const;  // midpoint, at the starting state
  double node_altitude_m(std::size_t node) const;
  void publish_xdmf() const;
  std::string path_;
  const ResultLayout& layout_ = ResultLayout::embedded();
  H5Writer file_;
  const TetherModel& model_;
  std::vector<std::size_t> nodes_;
  std::vector<ModelSeries> model_series_;
  std::vector<std::vector<double>> rows_;
  H5Writer::SeriesId time_, position_, velocity_, tension_, kinetic_, potential_, strain_, dissipated_,
      anchor_force_, angular_momentum_, angular_impulse_;
  std::vector<double> row_;
  std::vector<double> times_;  // every output time, for the .xmf
  double scenario_safety_factor_ = 0.0;  // the design's, for /summary (0: none)
};

}  // namespace hawser
