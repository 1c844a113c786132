#include "freshet/study/ensemble_run.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <exception>
#include <limits>
#include <mutex>
#include <thread>

#include "freshet/uncertainty/ensemble_statistics.hpp"

namespace freshet::study {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// What one member's run leaves: per station, the series at the output times and the peaks
// over every coupling step.
class MemberSink final : public network::RecordSink {
 public:
  void record(double time_s, std::span<const network::StationSample> samples) override {
    times_s.push_back(time_s);
    if (discharge.empty()) {
      discharge.resize(samples.size());
      stage.resize(samples.size());
      peak_q.assign(samples.size(), -1.0);
      peak_stage.assign(samples.size(), kNaN);
      peak_time.assign(samples.size(), 0.0);
    }
    for (std::size_t i = 0; i < samples.size(); ++i) {
      discharge[i].push_back(samples[i].discharge_m3s);
      stage[i].push_back(samples[i].stage_m);
    }
    observe(time_s, samples);
  }
  [[nodiscard]] bool observes_every_step() const override { return true; }
  void observe(double time_s, std::span<const network::StationSample> samples) override {
    if (peak_q.empty()) return;  // before the first record
    for (std::size_t i = 0; i < samples.size(); ++i) {
      if (samples[i].discharge_m3s > peak_q[i]) {
        peak_q[i] = samples[i].discharge_m3s;
        peak_time[i] = time_s;
      }
      if (std::isfinite(samples[i].stage_m) &&
          !(samples[i].stage_m <= peak_stage[i])) {  // NaN start: first finite value wins
        peak_stage[i] = samples[i].stage_m;
      }
    }
  }

  std::vector<double> times_s;
  std::vector<std::vector<double>> discharge;  // [station][time]
  std::vector<std::vector<double>> stage;
  std::vector<double> peak_q, peak_stage, peak_time;
};

}  // namespace

MemberRecord route_member(const Study& study, const EnsembleRequest& request, std::size_t member,
                          const CancelFn& cancel) {
  network::Model model =
      study.build_member_model(request.scenario_id, study.storm(request.storm_id), member);
  MemberRecord r;
  for (const auto& link : model.links) r.station_ids.push_back(link.id);
  MemberSink sink;
  const network::RunSummary run = network::simulate(
      model, study.settings().clock(), sink, [&](double) {
        if (cancel && cancel()) throw RunInterrupted("ensemble interrupted");
      });
  for (const auto& b : run.balances) r.outflow_volume_m3.push_back(b.ledger.outflow_m3);
  r.times_s = std::move(sink.times_s);
  r.discharge_m3s = std::move(sink.discharge);
  r.stage_m = std::move(sink.stage);
  r.peak_discharge_m3s = std::move(sink.peak_q);
  r.peak_stage_m = std::move(sink.peak_stage);
  r.peak_time_s = std::move(sink.peak_time);
  return r;
}

EnsembleOutcome run_ensemble(const Study& study, const EnsembleRequest& request,
                             const CancelFn& cancel, const network::ProgressFn& progress) {
  if (!study.ensemble()) {
    throw InputError(Problem{study.file().string(), 0, 0, "", "uncertainty",
                             "the basin file has no [uncertainty] section: nothing to vary"});
  }
  (void)study.storm(request.storm_id);  // InputError if unknown
  if (!request.scenario_id.empty()) (void)study.scenario(request.scenario_id);
  const EnsembleDefinition& e = *study.ensemble();

  // Members are independent runs: a pool of threads takes them in turn; each result lands in
  // its member's slot, so the outcome does not depend on the number of threads.
  std::vector<MemberRecord> results(e.members);
  std::atomic<std::size_t> next{0};
  std::atomic<std::size_t> done{0};
  std::exception_ptr failure;
  std::mutex failure_mutex;
  auto work = [&] {
    for (std::size_t m = next++; m < e.members; m = next++) {
      try {
        results[m] = route_member(study, request, m, cancel);
        const std::size_t finished = ++done;
        if (progress) progress(static_cast<double>(finished) / static_cast<double>(e.members));
      } catch (...) {
        const std::lock_guard lock(failure_mutex);
        if (!failure) failure = std::current_exception();
        next = e.members;  // the others stop after their current member
      }
    }
  };
  const unsigned threads = std::max(1U, std::min<unsigned>(request.threads,
                                                           static_cast<unsigned>(e.members)));
  std::vector<std::thread> pool;
  for (unsigned t = 1; t < threads; ++t) pool.emplace_back(work);
  work();
  for (std::thread& t : pool) t.join();
  if (failure) std::rethrow_exception(failure);

  return collate_members(results, request, e.percentiles);
}

EnsembleOutcome collate_members(const std::vector<MemberRecord>& results,
                                const EnsembleRequest& request,
                                const std::vector<double>& percentiles) {
  FRESHET_ASSERT(!results.empty(), "an ensemble of no members");
  const MemberRecord& first = results.front();
  const std::size_t members = results.size();
  const std::size_t n_stations = first.station_ids.size();
  const std::size_t n_times = first.times_s.size();
  for (const MemberRecord& r : results) {
    FRESHET_ASSERT(r.station_ids == first.station_ids && r.times_s.size() == n_times,
                   "ensemble members of different runs");
  }
  EnsembleOutcome out;
  out.scenario_id = request.scenario_id;
  out.storm_id = request.storm_id;
  out.members = members;
  out.percentiles = percentiles;
  out.times_s = first.times_s;
  std::vector<double> across(members);
  for (std::size_t k = 0; k < n_stations; ++k) {
    StationEnsemble s;
    s.id = first.station_ids[k];
    for (const MemberRecord& r : results) {
      s.peak_discharge_m3s.push_back(r.peak_discharge_m3s[k]);
      s.peak_stage_m.push_back(r.peak_stage_m[k]);
      s.peak_time_s.push_back(r.peak_time_s[k]);
      s.outflow_volume_m3.push_back(r.outflow_volume_m3[k]);
    }
    s.discharge_band_m3s.assign(percentiles.size(), std::vector<double>(n_times, kNaN));
    s.stage_band_m.assign(percentiles.size(), std::vector<double>(n_times, kNaN));
    for (std::size_t t = 0; t < n_times; ++t) {
      for (std::size_t m = 0; m < members; ++m) across[m] = results[m].discharge_m3s[k][t];
      const auto q_band = uncertainty::percentiles(across, percentiles);
      for (std::size_t m = 0; m < members; ++m) across[m] = results[m].stage_m[k][t];
      const bool has_stage = std::all_of(across.begin(), across.end(),
                                         [](double x) { return std::isfinite(x); });
      const auto h_band = has_stage ? uncertainty::percentiles(across, percentiles)
                                    : std::vector<double>(percentiles.size(), kNaN);
      for (std::size_t p = 0; p < percentiles.size(); ++p) {
        s.discharge_band_m3s[p][t] = q_band[p];
        s.stage_band_m[p][t] = h_band[p];
      }
    }
    out.stations.push_back(std::move(s));
  }
  return out;
}

}  // namespace freshet::study
