#pragma once
// Writes a run to the HDF5 result file of the architecture contract (format_version 1):
// static datasets (mesh, equilibrium, the scenario as run) at the start, time histories
// appended as the run goes and made durable at every flush, the summary at the end. The
// root attribute `status` is "running" until finish() writes "complete", "stopped" or
// "failed", so a file left by a killed run never looks complete.
#include <memory>
#include <string>
#include <vector>

#include "solver/h5_writer.hpp"
#include "solver/simulation.hpp"

namespace hawser {

class ResultRecorder : public OutputSink {
 public:
  ResultRecorder(const std::string& path, const Scenario& scenario, const TetherModel& model,
                 std::vector<std::size_t> nodes);
  void record(double t_s, const Matrix3X& x, const Matrix3X& v, const TetherDiagnostics& d) override;
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
  H5Writer file_;
  const TetherModel& model_;
  std::vector<std::size_t> nodes_;
  std::vector<ModelSeries> model_series_;
  std::vector<std::vector<double>> rows_;
  H5Writer::SeriesId time_, position_, velocity_, tension_, kinetic_, potential_, strain_, dissipated_,
      anchor_force_, angular_momentum_, angular_impulse_;
  std::vector<double> row_;
};

}  // namespace hawser
