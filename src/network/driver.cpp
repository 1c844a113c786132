#include "freshet/network/driver.hpp"

#include <algorithm>
#include <barrier>
#include <chrono>
#include <cmath>
#include <cstring>
#include <exception>
#include <limits>
#include <thread>
#include <utility>

#include "freshet/network/sweep_plan.hpp"

namespace freshet::network {

void Model::finalize() {
  FRESHET_ASSERT(links.size() == elements.size(), "one element per link");
  topology = build_topology(links);
}

void ClockOptions::validate() const {
  if (auto found = problems(); !found.empty()) throw InputError(std::move(found));
}

std::vector<Problem> ClockOptions::problems() const {
  ProblemList p("run settings");
  p.require_finite("start", start_s);
  p.require_finite("end", end_s);
  if (std::isfinite(start_s) && std::isfinite(end_s) && !(end_s > start_s)) {
    p.add("duration", "= " + format_value(end_s - start_s) + " s: the run must end after it starts");
  }
  p.require_positive("output_interval", output_interval_s);
  p.require_positive("coupling_step", max_coupling_step_s);
  if (p.empty()) check_counts(p);
  return p.problems();
}

// The counts are judged as doubles, before any conversion to an integer: a count that is not
// finite or does not fit would otherwise wrap (a 1e-300 s coupling step once gave a run of
// zero steps that wrote its initial state as the result).
ClockOptions::CountFault ClockOptions::count_fault() const {
  const double n = (end_s - start_s) / output_interval_s;
  if (!(n >= 1.0 - 1e-9)) return CountFault::output_interval_longer_than_run;
  if (!(output_count() <= kMaxCouplingSteps)) return CountFault::too_many_outputs;
  if (std::abs(n - std::round(n)) > 1e-9 * std::max(1.0, n)) {
    return CountFault::output_interval_not_whole;
  }
  if (!(coupling_step_count() <= kMaxCouplingSteps)) return CountFault::too_many_coupling_steps;
  return CountFault::none;
}

void ClockOptions::check_counts(ProblemList& p) const {
  const double length_s = end_s - start_s;
  const double n = length_s / output_interval_s;
  switch (count_fault()) {
    case CountFault::none:
      return;
    case CountFault::output_interval_longer_than_run:
      p.add("output_interval", "= " + format_value(output_interval_s) +
                                   " s: longer than the run (" + format_value(length_s) + " s)");
      return;
    case CountFault::too_many_outputs:
      p.add("output_interval", "= " + format_value(output_interval_s) + " s: gives " +
                                   format_value(n) + " output times, more than can be counted "
                                   "exactly (2^53)");
      return;
    case CountFault::output_interval_not_whole:
      p.add("output_interval", "= " + format_value(output_interval_s) +
                                   " s: must divide the run length (" + format_value(length_s) +
                                   " s) into whole steps");
      return;
    case CountFault::too_many_coupling_steps:
      p.add("coupling_step", "= " + format_value(max_coupling_step_s) + " s: gives " +
                                 format_value(coupling_step_count()) +
                                 " coupling steps, more than can be counted exactly (2^53); "
                                 "use a longer step");
      return;
  }
}

double ClockOptions::output_count() const {
  return std::round((end_s - start_s) / output_interval_s);
}

double ClockOptions::steps_per_output() const {
  return std::max(1.0, std::ceil(output_interval_s / max_coupling_step_s - 1e-12));
}

double ClockOptions::coupling_step_s() const { return output_interval_s / steps_per_output(); }

double relative_imbalance(const VolumeLedger& l, const BalanceTolerance& tolerance) {
  const double scale = std::max({l.supplied_m3(), l.outflow_m3 + l.loss_m3, tolerance.floor_m3});
  const double error = std::abs(l.balance_error_m3());
  if (!std::isfinite(error) || !std::isfinite(scale)) return std::numeric_limits<double>::quiet_NaN();
  return error / scale;
}

void require_sound_run(const RunSummary& run, const BalanceTolerance& tolerance) {
  if (run.coupling_steps <= 0) {
    throw NumericalError("the run took no coupling step, so its results would be the initial "
                         "state; check coupling_step_s and output_interval_min");
  }
  for (const ElementBalance& b : run.balances) {
    const double rel = relative_imbalance(b.ledger, tolerance);
    if (rel <= tolerance.relative) continue;
    const VolumeLedger& l = b.ledger;
    throw NumericalError(
        "element '" + b.id + "': volume balance error " + format_value(l.balance_error_m3()) +
        " m3 (" + format_value(rel) + " of the water that passed; the limit is " +
        format_value(tolerance.relative) + "): supplied " + format_value(l.supplied_m3()) +
        " m3, out " + format_value(l.outflow_m3) + " m3, lost " + format_value(l.loss_m3) +
        " m3, stored " + format_value(l.initial_storage_m3) + " -> " +
        format_value(l.storage_m3) + " m3; the results are not written (check the element's "
        "dimensions and cells for values far outside the physical range)");
  }
  if (!(run.network_relative_imbalance <= tolerance.relative)) {
    throw NumericalError("the network's volume balance error is " +
                         format_value(run.network_relative_imbalance) +
                         " of its water (the limit is " + format_value(tolerance.relative) +
                         "): water sent downstream does not match what was received; the "
                         "results are not written");
  }
}

namespace {

// Advances element i over [t0, t1] from the outflows of the elements draining into it.
void advance_element(Model& model, std::size_t i, double t0_s, double t1_s,
                     std::vector<StepOutflow>& out) {
  StepInflow in{t0_s, t1_s};
  const bool lateral = model.elements[i]->takes_lateral_inflow();
  for (std::size_t u : model.topology.upstream[i]) {
    const bool along = lateral && model.links[u].kind == ElementKind::subcatchment;
    (along ? in.lateral_mean_m3s : in.inflow_mean_m3s) += out[u].mean_m3s;
    (along ? in.lateral_end_m3s : in.inflow_end_m3s) += out[u].end_m3s;
  }
  out[i] = model.elements[i]->advance(in);
}

// The work of one element per coupling step, for cutting the network between threads: its
// cells where it has any (reaches), otherwise one.
std::vector<double> element_weights(const Model& model) {
  std::vector<double> w(model.elements.size());
  for (std::size_t i = 0; i < w.size(); ++i) {
    w[i] = 1.0 + static_cast<double>(model.elements[i]->cell_samples().size());
  }
  return w;
}

// Advances the network one coupling step at a time, upstream first: serially on the calling
// thread, or with the lanes of a sweep plan on worker threads (the calling thread takes lane
// 0, waits for the others at a barrier, then advances the trunk).
class Sweeper {
 public:
  Sweeper(Model& model, int threads, std::vector<StepOutflow>& out)
      : model_(model),
        out_(out),
        plan_(plan_sweep(model.topology, threads > 1 ? element_weights(model)
                                                     : std::vector<double>(model.elements.size(), 1.0),
                         threads)),
        failures_(plan_.lanes.size()),
        position_(model.elements.size()),
        start_(static_cast<std::ptrdiff_t>(plan_.lanes.size())),
        done_(static_cast<std::ptrdiff_t>(plan_.lanes.size())) {
    for (std::size_t k = 0; k < model.topology.order.size(); ++k) position_[model.topology.order[k]] = k;
    try {
      for (std::size_t k = 1; k < plan_.lanes.size(); ++k) workers_.emplace_back([this, k] { work(k); });
    } catch (...) {
      // A thread could not be started: release the workers that were (the lanes without a
      // thread drop out of the barrier) and let the error through.
      stop_ = true;
      for (std::size_t k = workers_.size() + 1; k < plan_.lanes.size(); ++k) (void)start_.arrive_and_drop();
      start_.arrive_and_wait();
      workers_.clear();
      throw;
    }
  }
  ~Sweeper() {
    if (workers_.empty()) return;
    stop_ = true;
    start_.arrive_and_wait();
  }
  Sweeper(const Sweeper&) = delete;
  Sweeper& operator=(const Sweeper&) = delete;

  void sweep(double t0_s, double t1_s) {
    t0_s_ = t0_s;
    t1_s_ = t1_s;
    if (!workers_.empty()) start_.arrive_and_wait();
    run_lane(0);
    if (!workers_.empty()) done_.arrive_and_wait();
    rethrow_first_failure();
    for (std::size_t i : plan_.trunk) advance_element(model_, i, t0_s_, t1_s_, out_);
  }

 private:
  struct Failure {
    std::exception_ptr error;
    std::size_t position = 0;  // of the failed element in the topological order
  };

  void work(std::size_t lane) {
    for (;;) {
      start_.arrive_and_wait();
      if (stop_) return;
      run_lane(lane);
      done_.arrive_and_wait();
    }
  }

  // A lane stops at its first failure. The serial sweep would have failed at the failure
  // earliest in the topological order (a lane's order is a subsequence of it), so that is
  // the one rethrown, whatever the number of threads.
  void run_lane(std::size_t lane) noexcept {
    for (std::size_t i : plan_.lanes[lane]) {
      try {
        advance_element(model_, i, t0_s_, t1_s_, out_);
      } catch (...) {
        failures_[lane] = {std::current_exception(), position_[i]};
        return;
      }
    }
  }

  void rethrow_first_failure() {
    const Failure* first = nullptr;
    for (const Failure& f : failures_) {
      if (f.error && (!first || f.position < first->position)) first = &f;
    }
    if (first) std::rethrow_exception(first->error);
  }

  Model& model_;
  std::vector<StepOutflow>& out_;
  SweepPlan plan_;
  std::vector<Failure> failures_;
  std::vector<std::size_t> position_;
  double t0_s_ = 0.0, t1_s_ = 0.0;
  bool stop_ = false;  // read by the workers after the start barrier
  std::barrier<> start_, done_;
  std::vector<std::jthread> workers_;  // last: joined before the barriers go
};

// Hands every element the instantaneous inflow at the start (upstream first), so that the
// first record of a junction shows what flows into it.
void prime(Model& model) {
  for (std::size_t i : model.topology.order) {
    double q = 0.0;
    for (std::size_t u : model.topology.upstream[i]) q += model.elements[u]->sample().discharge_m3s;
    model.elements[i]->prime(q);
  }
}

// Each element's sample, its ledger's volumes, and the total inflow at the sample time: the
// sum of the discharges of the elements draining into it (the same split into point and
// lateral inflow as sweep() makes).
void take_samples(const Model& model, std::vector<StationSample>& samples) {
  for (std::size_t i = 0; i < model.elements.size(); ++i) {
    samples[i] = model.elements[i]->sample();
    const VolumeLedger ledger = model.elements[i]->ledger();
    samples[i].outflow_volume_m3 = ledger.outflow_m3;
    samples[i].storage_m3 = ledger.storage_m3;
  }
  for (std::size_t i = 0; i < model.elements.size(); ++i) {
    const bool lateral = model.elements[i]->takes_lateral_inflow();
    double total = 0.0, along = 0.0;
    for (std::size_t u : model.topology.upstream[i]) {
      total += samples[u].discharge_m3s;
      if (lateral && model.links[u].kind == ElementKind::subcatchment) along += samples[u].discharge_m3s;
    }
    samples[i].inflow_m3s = total;
    samples[i].lateral_inflow_m3s = along;
  }
}

void emit(const Model& model, double t_s, std::vector<StationSample>& samples, RecordSink& sink) {
  take_samples(model, samples);
  sink.record(t_s, samples);
}

// The whole network's balance: every element's error plus every mismatch between what an
// element's upstream elements sent and what it received, against the water its sources made
// or that left it (as relative_imbalance() does for one element).
double network_imbalance(const Model& model, const std::vector<ElementBalance>& balances,
                         const BalanceTolerance& tolerance) {
  double error_m3 = 0.0, mismatch_m3 = 0.0;
  VolumeLedger whole;
  for (std::size_t i = 0; i < balances.size(); ++i) {
    const VolumeLedger& l = balances[i].ledger;
    error_m3 += l.balance_error_m3();
    whole.loss_m3 += l.loss_m3;
    if (model.topology.upstream[i].empty()) {
      whole.inflow_m3 += l.supplied_m3();
    } else {
      double sent_m3 = 0.0;
      for (std::size_t u : model.topology.upstream[i]) sent_m3 += balances[u].ledger.outflow_m3;
      mismatch_m3 += std::abs(sent_m3 - (l.inflow_m3 + l.lateral_m3));
    }
    if (model.links[i].kind == ElementKind::outlet) whole.outflow_m3 += l.outflow_m3;
  }
  const double scale =
      std::max({whole.supplied_m3(), whole.outflow_m3 + whole.loss_m3, tolerance.floor_m3});
  const double total = std::abs(error_m3) + mismatch_m3;
  if (!std::isfinite(total) || !std::isfinite(scale)) return std::numeric_limits<double>::quiet_NaN();
  return total / scale;
}

RunSummary summarise(const Model& model) {
  RunSummary r;
  for (const auto& e : model.elements) {
    const VolumeLedger l = e->ledger();
    r.balances.push_back({e->id(), l});
    // A NaN imbalance (volumes not finite) counts as infinite, so it cannot hide.
    const double rel = relative_imbalance(l);
    const double worst = std::isnan(rel) ? std::numeric_limits<double>::infinity() : rel;
    if (worst > r.worst_relative_imbalance) {
      r.worst_relative_imbalance = worst;
      r.worst_element = e->id();
    }
  }
  r.network_relative_imbalance = network_imbalance(model, r.balances, BalanceTolerance{});
  return r;
}

// The run's own entries: the step, its time and the clock they belong to.
void visit_clock(StateVisitor& v, ClockOptions& clock, long long& step, double& time_s) {
  StateGroup g(v, "run");
  v.value("step", step);
  v.value("time_s", time_s);
  v.value("start_s", clock.start_s);
  v.value("end_s", clock.end_s);
  v.value("output_interval_s", clock.output_interval_s);
  v.value("coupling_step_s", clock.max_coupling_step_s);
}

// The run's own entries, and every element's and the sink's state.
void visit_run(StateVisitor& v, Model& model, RecordSink& sink, ClockOptions& clock,
               long long& step, double& time_s) {
  visit_clock(v, clock, step, time_s);
  {
    StateGroup g(v, "elements");
    for (auto& e : model.elements) {
      StateGroup element(v, e->id());
      e->visit_state(v);
    }
  }
  StateGroup g(v, "records");
  sink.visit_state(v);
}

void refuse_state(const std::string& source, const std::string& field, const std::string& message) {
  Problem p;
  p.file = source;
  p.element = "state file";
  p.field = field;
  p.message = message;
  throw InputError(std::move(p));
}

}  // namespace

StateArchive save_run_state(Model& model, RecordSink& sink, const ClockOptions& clock,
                            long long step, double time_s) {
  StateArchive archive;
  StateWriter w(archive);
  ClockOptions c = clock;
  visit_run(w, model, sink, c, step, time_s);
  return archive;
}

long long restore_run_state(Model& model, RecordSink& sink, const ClockOptions& clock,
                            const StateArchive& state, const std::string& source) {
  StateReader r(state, source);
  ClockOptions saved = clock;
  long long step = 0;
  double time_s = 0.0;
  // The clock first: a state from another storm or scenario is named by its clock before
  // any element is touched.
  visit_clock(r, saved, step, time_s);
  const auto differs = [&](const char* field, double mine, double theirs) {
    if (std::memcmp(&mine, &theirs, sizeof(double)) == 0) return;
    refuse_state(source, field, "= " + format_value(theirs) + " s in the state file, " +
                                    format_value(mine) + " s in this run: the state was saved "
                                    "from a run with another clock (another storm or scenario)");
  };
  differs("run/start_s", clock.start_s, saved.start_s);
  differs("run/end_s", clock.end_s, saved.end_s);
  differs("run/output_interval_s", clock.output_interval_s, saved.output_interval_s);
  differs("run/coupling_step_s", clock.max_coupling_step_s, saved.max_coupling_step_s);
  const auto total = static_cast<long long>(clock.coupling_step_count());
  if (step < 1 || step >= total) {
    refuse_state(source, "run/step", "= " + std::to_string(step) + ": a run resumes after one of "
                 "its coupling steps 1 to " + std::to_string(total - 1));
  }
  StateReader all(state, source);
  ClockOptions c = clock;
  long long s = 0;
  double t = 0.0;
  visit_run(all, model, sink, c, s, t);
  all.require_all_read();
  return step;
}

RunSummary simulate(Model& model, const ClockOptions& clock, RecordSink& sink,
                    const ProgressFn& progress, const SweepOptions& sweep_options,
                    const HotStart& hot_start) {
  clock.validate();
  const auto wall_start = std::chrono::steady_clock::now();
  for (auto& e : model.elements) e->reset(clock.start_s);
  prime(model);
  couple_backwater(model, clock.start_s);
  const long long resume_after =
      hot_start.resume ? restore_run_state(model, sink, clock, *hot_start.resume,
                                           hot_start.resume_source)
                       : 0;
  const auto saves_after = [&hot_start](long long step) {
    return hot_start.save && std::find(hot_start.save_after_steps.begin(),
                                       hot_start.save_after_steps.end(),
                                       step) != hot_start.save_after_steps.end();
  };

  // validate() has bounded both counts by kMaxCouplingSteps, so the conversions are exact.
  const double dt_s = clock.coupling_step_s();
  const auto steps_per_output = static_cast<long long>(clock.steps_per_output());
  const auto outputs = static_cast<long long>(clock.output_count());
  std::vector<StepOutflow> outflow(model.elements.size());
  std::vector<StationSample> samples(model.elements.size());
  FRESHET_ASSERT(sweep_options.threads >= 1, "a run needs at least one thread");
  Sweeper sweeper(model, sweep_options.threads, outflow);

  if (resume_after == 0) emit(model, clock.start_s, samples, sink);
  long long steps = 0;
  double t0 = clock.start_s;
  for (long long k = 1; k <= outputs; ++k) {
    // Times come from integer counts, so the clock lands exactly on every output time and
    // each step starts exactly where the last one ended (a resumed run counts the same
    // times through the steps it skips).
    const double output_start = clock.start_s + static_cast<double>(k - 1) * clock.output_interval_s;
    const double output_end = clock.start_s + static_cast<double>(k) * clock.output_interval_s;
    for (long long j = 1; j <= steps_per_output; ++j) {
      const double t1 = (j == steps_per_output) ? output_end
                                                : output_start + static_cast<double>(j) * dt_s;
      if (steps < resume_after) {
        t0 = t1;
        ++steps;
        continue;
      }
      // Backwater coupling stays on this thread, between sweeps: no lane runs while a
      // drowned reach and its pool exchange water (backwater.hpp).
      couple_backwater(model, t0);
      sweeper.sweep(t0, t1);
      t0 = t1;
      ++steps;
      if (j < steps_per_output) {
        if (sink.observes_every_step()) {
          take_samples(model, samples);
          sink.observe(t1, samples);
        }
      } else {
        emit(model, output_end, samples, sink);
        if (progress) progress(static_cast<double>(k) / static_cast<double>(outputs));
      }
      if (saves_after(steps)) hot_start.save(steps, t1, save_run_state(model, sink, clock, steps, t1));
    }
  }
  RunSummary r = summarise(model);
  r.coupling_steps = steps;
  r.wall_time_s =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - wall_start).count();
  require_sound_run(r);
  return r;
}

}  // namespace freshet::network
