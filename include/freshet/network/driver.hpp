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

#include "freshet/core/error.hpp"
#include "freshet/network/backwater.hpp"
#include "freshet/network/element.hpp"
#include "freshet/network/topology.hpp"

namespace freshet::network {

// A basin network ready to run: elements[i] belongs to links[i].
struct Model {
  std::vector<Link> links;
  std::vector<std::unique_ptr<Element>> elements;
  Topology topology;
  // Reaches whose drowned length a pool's level takes over (backwater.hpp); empty unless
  // represent_backwater() was called.
  std::vector<BackwaterLink> backwater;

  // Checks the links (throws InputError listing every problem) and orders the network.
  void finalize();
};

struct ClockOptions {
  double start_s = 0.0;            // run start, seconds after the study's reference time
  double end_s = 0.0;              // run end
  double output_interval_s = 300;  // station samples are taken at this interval
  double max_coupling_step_s = 60; // elements exchange flows at least this often

  // Throws InputError (element "run settings") unless start < end, both intervals > 0, the
  // output interval divides the run length into at least one whole step (to 1e-9 relative),
  // and the run's coupling steps can be counted exactly (at most kMaxCouplingSteps in all).
  void validate() const;
  // The problems validate() would throw, without throwing (empty when the clock is valid).
  [[nodiscard]] std::vector<Problem> problems() const;
  // The coupling step actually used: the output interval divided into equal parts no
  // longer than max_coupling_step_s.
  [[nodiscard]] double coupling_step_s() const;
  // The counts the driver loops over, as doubles so that they can be judged before they are
  // converted: output intervals in the run, coupling steps per output interval, and their
  // product. Infinite or NaN for settings that validate() refuses.
  [[nodiscard]] double output_count() const;
  [[nodiscard]] double steps_per_output() const;
  [[nodiscard]] double coupling_step_count() const { return output_count() * steps_per_output(); }

  // 2^53: every count up to here, and every time built from it, is exact in a double.
  static constexpr double kMaxCouplingSteps = 9007199254740992.0;

  // The first rule on the counts that the clock breaks, for a clock whose times are finite,
  // whose end is after its start and whose intervals are positive (validate() says so with
  // the clock's own field names; io says it with the basin file's keys, at their lines).
  enum class CountFault {
    none,
    output_interval_longer_than_run,  // fewer than one output interval in the run
    too_many_outputs,                 // more than kMaxCouplingSteps output times
    output_interval_not_whole,        // the interval does not divide the run (to 1e-9)
    too_many_coupling_steps,          // more than kMaxCouplingSteps coupling steps
  };
  [[nodiscard]] CountFault count_fault() const;

 private:
  void check_counts(ProblemList& problems) const;
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
  // Hot start: what the sink has accumulated that the rest of the run's results read
  // (summary accumulators). Default: nothing (a sink that only passes samples on).
  virtual void visit_state(StateVisitor& /*v*/) {}
};

struct ElementBalance {
  std::string id;
  VolumeLedger ledger;
};

// The volume balance every run must meet. An element's relative imbalance is
//   |inflow + lateral + rain - loss - outflow - (storage - initial storage)| / V,
//   V = max(supplied, outflow + loss, floor_m3):
// the error against the water that passed through the element, and against the floor when
// that is tiny (1 m3 allows an absolute error of 1e-9 m3). Storage is deliberately not part of
// V: an element holding so much water that a change in it cannot be resolved to 1e-9 of what
// passed (a reach of 1e308 m) fails rather than hiding its error behind its storage. The whole
// network is judged the same way, with every element's error and every mismatch between what
// an element sent downstream and what its downstream element received, against the water of
// its sources. NaN or infinite volumes always fail. Common practice, no source: the schemes
// close their balances to round-off (about 1e-15 relative for a storm, a few 1e-12 over a
// 30-day run, docs/cautions.md), so 1e-9 is far above round-off and far below any error that
// would matter in a result.
struct BalanceTolerance {
  double relative = 1e-9;
  double floor_m3 = 1.0;
};

// An element's relative imbalance as defined above (NaN when any volume is not finite).
[[nodiscard]] double relative_imbalance(const VolumeLedger& ledger,
                                        const BalanceTolerance& tolerance = {});

struct RunSummary {
  long long coupling_steps = 0;
  double wall_time_s = 0.0;
  std::vector<ElementBalance> balances;  // per element, links order
  double worst_relative_imbalance = 0.0;    // max over elements of relative_imbalance()
  std::string worst_element;                // the element with that imbalance
  double network_relative_imbalance = 0.0;  // the whole network, as BalanceTolerance says
};

// Throws NumericalError unless the run took at least one coupling step and every element and
// the whole network meet `tolerance`; the message names the worst element, its volumes and
// the tolerance. simulate() calls it before returning, so no caller can write the results of
// a run that lost or made water.
void require_sound_run(const RunSummary& run, const BalanceTolerance& tolerance = {});

// Progress callback: fraction of simulated time done, in [0, 1].
using ProgressFn = std::function<void(double)>;

// How one run uses threads.
struct SweepOptions {
  // Threads that advance the elements within each coupling step (>= 1). With more than one,
  // independent subtrees are advanced in parallel (sweep_plan.hpp) and the elements below
  // them on the driver's thread once they are done; every element does the same arithmetic
  // on the same inputs as in the serial sweep, so the results are bit-identical. The driver's
  // thread keeps the clock, the samples and the sink.
  int threads = 1;
};

// Hot start (docs/state-files.md). A run's state at the end of a coupling step is the state of
// every element and of the sink, with the step index and the clock: group "run" holds
// step (coupling steps done since the start), time_s, start_s, end_s, output_interval_s and
// coupling_step_s; group "elements/<id>" each element's state (Element::visit_state); group
// "records" the sink's (RecordSink::visit_state).
struct HotStart {
  // Coupling steps (1 = the end of the first) after which the state is handed to `save`.
  std::vector<long long> save_after_steps;
  std::function<void(long long step, double time_s, const StateArchive& state)> save;
  // Resume from a saved state: the run restores every element and the sink from it (after
  // reset and prime) and continues with the next coupling step; it records nothing before
  // that. `resume_source` (the state file) is named in every refusal.
  const StateArchive* resume = nullptr;
  std::string resume_source;
};

// The state of the run after `step` coupling steps, ending at time_s (see HotStart).
[[nodiscard]] StateArchive save_run_state(Model& model, RecordSink& sink, const ClockOptions& clock,
                                          long long step, double time_s);
// Restores a saved state into a freshly reset model and sink; returns the step it was saved
// after. Throws InputError naming `source` when the state is not of this network and clock
// (another study, scenario or storm): a missing, extra or mis-sized entry, or a clock field
// that differs.
long long restore_run_state(Model& model, RecordSink& sink, const ClockOptions& clock,
                            const StateArchive& state, const std::string& source);

RunSummary simulate(Model& model, const ClockOptions& clock, RecordSink& sink,
                    const ProgressFn& progress = {}, const SweepOptions& sweep = {},
                    const HotStart& hot_start = {});

}  // namespace freshet::network
