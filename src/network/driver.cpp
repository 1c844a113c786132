#include "freshet/network/driver.hpp"

#include <chrono>
#include <cmath>

namespace freshet::network {

void Model::finalize() {
  FRESHET_ASSERT(links.size() == elements.size(), "one element per link");
  topology = build_topology(links);
}

void ClockOptions::validate() const {
  ProblemList p("run settings");
  p.require_finite("start", start_s);
  p.require_finite("end", end_s);
  if (std::isfinite(start_s) && std::isfinite(end_s) && !(end_s > start_s)) {
    p.add("duration", "= " + format_value(end_s - start_s) + " s: the run must end after it starts");
  }
  p.require_positive("output_interval", output_interval_s);
  p.require_positive("coupling_step", max_coupling_step_s);
  if (p.empty()) {
    const double n = (end_s - start_s) / output_interval_s;
    if (std::abs(n - std::round(n)) > 1e-9 * std::max(1.0, n)) {
      p.add("output_interval", "= " + format_value(output_interval_s) +
                                   " s: must divide the run length (" +
                                   format_value(end_s - start_s) + " s) into whole steps");
    }
  }
  p.throw_if_any();
}

double ClockOptions::coupling_step_s() const {
  const double parts = std::ceil(output_interval_s / max_coupling_step_s - 1e-12);
  return output_interval_s / std::max(1.0, parts);
}

namespace {

// Advances every element over [t0, t1], upstream first, passing outflows downstream.
void sweep(Model& model, double t0_s, double t1_s, std::vector<StepOutflow>& out) {
  for (std::size_t i : model.topology.order) {
    StepInflow in{t0_s, t1_s};
    const bool lateral = model.elements[i]->takes_lateral_inflow();
    for (std::size_t u : model.topology.upstream[i]) {
      const bool along = lateral && model.links[u].kind == ElementKind::subcatchment;
      (along ? in.lateral_mean_m3s : in.inflow_mean_m3s) += out[u].mean_m3s;
      (along ? in.lateral_end_m3s : in.inflow_end_m3s) += out[u].end_m3s;
    }
    out[i] = model.elements[i]->advance(in);
  }
}

// Hands every element the instantaneous inflow at the start (upstream first), so that the
// first record of a junction shows what flows into it.
void prime(Model& model) {
  for (std::size_t i : model.topology.order) {
    double q = 0.0;
    for (std::size_t u : model.topology.upstream[i]) q += model.elements[u]->sample().discharge_m3s;
    model.elements[i]->prime(q);
  }
}

void take_samples(const Model& model, std::vector<StationSample>& samples) {
  for (std::size_t i = 0; i < model.elements.size(); ++i) {
    samples[i] = model.elements[i]->sample();
    samples[i].outflow_volume_m3 = model.elements[i]->ledger().outflow_m3;
  }
}

void emit(const Model& model, double t_s, std::vector<StationSample>& samples, RecordSink& sink) {
  take_samples(model, samples);
  sink.record(t_s, samples);
}

RunSummary summarise(const Model& model) {
  RunSummary r;
  for (const auto& e : model.elements) {
    const VolumeLedger l = e->ledger();
    r.balances.push_back({e->id(), l});
    const double scale = std::max({l.supplied_m3(), l.outflow_m3, 1e-300});
    r.worst_relative_imbalance = std::max(r.worst_relative_imbalance,
                                          std::abs(l.balance_error_m3()) / scale);
    for (auto& note : e->notes()) r.notes.emplace_back(e->id(), std::move(note));
  }
  return r;
}

}  // namespace

RunSummary simulate(Model& model, const ClockOptions& clock, RecordSink& sink,
                    const ProgressFn& progress) {
  clock.validate();
  const auto wall_start = std::chrono::steady_clock::now();
  for (auto& e : model.elements) e->reset(clock.start_s);
  prime(model);

  const double dt_s = clock.coupling_step_s();
  const auto steps_per_output =
      static_cast<long long>(std::llround(clock.output_interval_s / dt_s));
  const auto outputs = static_cast<long long>(
      std::llround((clock.end_s - clock.start_s) / clock.output_interval_s));
  std::vector<StepOutflow> outflow(model.elements.size());
  std::vector<StationSample> samples(model.elements.size());

  emit(model, clock.start_s, samples, sink);
  long long steps = 0;
  double t0 = clock.start_s;
  for (long long k = 1; k <= outputs; ++k) {
    // Times come from integer counts, so the clock lands exactly on every output time and
    // each step starts exactly where the last one ended.
    const double output_start = clock.start_s + static_cast<double>(k - 1) * clock.output_interval_s;
    const double output_end = clock.start_s + static_cast<double>(k) * clock.output_interval_s;
    for (long long j = 1; j <= steps_per_output; ++j) {
      const double t1 = (j == steps_per_output) ? output_end
                                                : output_start + static_cast<double>(j) * dt_s;
      sweep(model, t0, t1, outflow);
      t0 = t1;
      ++steps;
      if (j < steps_per_output && sink.observes_every_step()) {
        take_samples(model, samples);
        sink.observe(t1, samples);
      }
    }
    emit(model, output_end, samples, sink);
    if (progress) progress(static_cast<double>(k) / static_cast<double>(outputs));
  }
  RunSummary r = summarise(model);
  r.coupling_steps = steps;
  r.wall_time_s =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - wall_start).count();
  return r;
}

}  // namespace freshet::network
