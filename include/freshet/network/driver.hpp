// The simulation driver: owns the clock, sweeps the network upstream first once per coupling
// step, and hands station samples to a sink at every output time.
//
//   Model model = ...;                         // elements + links, built by io from a basin file
//   ClockOptions clock{0.0, 6 * 3600.0, 300.0, 60.0};
//   RunSummary r = simulate(model, clock, sink);
#pragma once

#include <functional>
#include <memory>
#include <span>
#include <string>
#include <vector>

#include "freshet/network/element.hpp"
#include "freshet/network/topology.hpp"

namespace freshet::network {

// A basin network ready to run: elements[i] belongs to links[i].
struct Model {
  std::vector<Link> links;
  std::vector<std::unique_ptr<Element>> elements;
  Topology topology;

  // Checks the links (throws InputError listing every problem) and orders the network.
  void finalize();
};

struct ClockOptions {
  double start_s = 0.0;            // run start, seconds after the study's reference time
  double end_s = 0.0;              // run end
  double output_interval_s = 300;  // station samples are taken at this interval
  double max_coupling_step_s = 60; // elements exchange flows at least this often

  // Throws InputError (element "run settings") unless start < end, both intervals > 0 and
  // the output interval divides the run length into whole steps (to 1e-9 relative).
  void validate() const;
  // The coupling step actually used: the output interval divided into equal parts no
  // longer than max_coupling_step_s.
  [[nodiscard]] double coupling_step_s() const;
};

// Receives one sample per station (in links order) at the start and at every output time
// (record), and, if it asks for them, at the end of every other coupling step (observe), so
// that peaks between output times are not missed.
class RecordSink {
 public:
  virtual ~RecordSink() = default;
  virtual void record(double time_s, std::span<const StationSample> samples) = 0;
  [[nodiscard]] virtual bool observes_every_step() const { return false; }
  virtual void observe(double /*time_s*/, std::span<const StationSample> /*samples*/) {}
};

struct ElementBalance {
  std::string id;
  VolumeLedger ledger;
};

struct RunSummary {
  long long coupling_steps = 0;
  double wall_time_s = 0.0;
  std::vector<ElementBalance> balances;  // per element, links order
  std::vector<std::pair<std::string, ElementNote>> notes;
  double worst_relative_imbalance = 0.0; // max over elements of |imbalance| / supplied volume
};

// Progress callback: fraction of simulated time done, in [0, 1].
using ProgressFn = std::function<void(double)>;

RunSummary simulate(Model& model, const ClockOptions& clock, RecordSink& sink,
                    const ProgressFn& progress = {});

}  // namespace freshet::network
