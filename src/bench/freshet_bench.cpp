// freshet-bench: cell-update rates of the routing schemes, side by side with a bare loop that
// only evaluates the same flux law over the same cells in the same run.
//
//   ./freshet-bench [cells] [repeats]     (defaults 20000 cells, best of 3)
//   ./freshet-bench --bare-update [cells]  (only the bare update loop of tools/scale_bench.py)
//   ./freshet-bench --long-reach [cells]   (the single long reach of issue 16; compare with
//                                           tools/numpy_reach.py in the same session)
//
// Prints, per flux law: bare Q(A) evaluations per second; per scheme: cell updates per second
// (accepted steps x cells), the ratio to the bare loop, the cost per step relative to the
// explicit scheme, and the bytes per cell the reach holds. Not a test: figures depend on the
// machine (see docs/performance.md for measured values and how to reproduce them).
#include <algorithm>
#include <chrono>
#include <memory>
#include <cmath>
#include <ctime>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "freshet/geometry/section_flux.hpp"
#include "freshet/routing/kinematic_reach.hpp"
#include "freshet/routing/make_reach.hpp"

namespace {

using namespace freshet;
using namespace freshet::routing;
using Clock = std::chrono::steady_clock;

double seconds_since(Clock::time_point start) {
  return std::chrono::duration<double>(Clock::now() - start).count();
}

struct Measured {
  double cell_updates_per_s = 0.0;
  double seconds_per_step = 0.0;
  double bytes_per_cell = 0.0;
  double max_courant = 0.0;
};

// Every cell active in every step: the reach starts with a discharge falling linearly from
// 10 x base at the inlet to base at the outlet (a long compression wave) and takes 10 x base in.
template <class Law>
Measured run_scheme(const Law& law, int cells, SchemeKind scheme, double implicit_courant,
                    double base_q, int repeats) {
  Measured best;
  for (int r = 0; r < repeats; ++r) {
    RoutingOptions opt;
    opt.scheme = scheme;
    opt.implicit_courant = implicit_courant;
    const double length = 10.0 * cells;  // dx = 10 m
    KinematicReach<Law> reach({"bench", length, cells}, law, opt);
    std::vector<double> a0(static_cast<std::size_t>(cells));
    for (int i = 0; i < cells; ++i) {
      a0[static_cast<std::size_t>(i)] = law.area_for_discharge_m2(base_q * (10.0 - 9.0 * i / cells));
    }
    reach.set_initial_areas(a0);
    const double c = law.celerity_m_s(law.area_for_discharge_m2(10.0 * base_q));
    const double t_end = 200.0 * 10.0 / c;  // ~200 explicit steps at the peak celerity
    const auto inflow = PiecewiseLinearSeries::constant(10.0 * base_q);
    const auto start = Clock::now();
    (void)reach.advance(0.0, t_end, inflow, LateralInflow::none());
    const double wall = seconds_since(start);
    const RunDiagnostics d = reach.diagnostics();
    const double rate = static_cast<double>(d.cell_updates) / wall;
    if (rate > best.cell_updates_per_s) {
      best.cell_updates_per_s = rate;
      best.seconds_per_step = wall / static_cast<double>(d.steps_taken);
      best.bytes_per_cell = reach.memory_bytes_per_cell();
      best.max_courant = d.max_courant;
    }
  }
  return best;
}

// The bare loop: Q(A) over the same number of cells, as many sweeps as `sweeps`.
template <class Law>
double bare_rate(const Law& law, int cells, double base_q, int sweeps, int repeats) {
  std::vector<double> a(static_cast<std::size_t>(cells));
  for (int i = 0; i < cells; ++i) {
    a[static_cast<std::size_t>(i)] = law.area_for_discharge_m2(base_q * (1.0 + 9.0 * i / cells));
  }
  double best = 0.0, sink = 0.0;
  for (int r = 0; r < repeats; ++r) {
    const auto start = Clock::now();
    for (int s = 0; s < sweeps; ++s) {
      double sum = 0.0;
      for (double x : a) sum += law.discharge_m3s(x);
      sink += sum;
      a[static_cast<std::size_t>(s % cells)] *= 1.0 + 1e-16;  // keep the loop from hoisting
    }
    best = std::max(best, static_cast<double>(cells) * sweeps / seconds_since(start));
  }
  if (sink == 42.0) std::puts("");  // consume the result
  return best;
}

// The bare update loop: one explicit upwind sweep (Q(A) at every cell, then the conservative
// update at Courant 0.5) over `cells` cells of the trapezoidal channel of tools/make_network.py
// (2 m bottom, 2:1 sides, n 0.035, S0 0.005), repeated for about 2e8 cell updates; the best of
// three. Printed as "bare-update <rate>" for tools/scale_bench.py to read.
double bare_update_rate(int cells) {
  const geometry::TrapezoidalFlux law(2.0, 2.0, 2.0, 0.035, 0.005);
  const auto n = static_cast<std::size_t>(cells);
  std::vector<double> a(n), q(n);
  for (std::size_t i = 0; i < n; ++i) {
    a[i] = law.area_for_discharge_m2(1.0 + 4.0 * static_cast<double>(i % 50) / 50.0);
  }
  const double dx = 20.0;
  const double dt = 0.5 * dx / law.celerity_m_s(law.area_for_discharge_m2(5.0));
  const double inflow = 5.0, ratio = dt / dx;
  const int sweeps = std::max(1, static_cast<int>(2e8 / static_cast<double>(cells)));
  double best = 0.0;
  for (int r = 0; r < 3; ++r) {
    const auto start = Clock::now();
    for (int s = 0; s < sweeps; ++s) {
      for (std::size_t i = 0; i < n; ++i) q[i] = law.discharge_m3s(a[i]);
      a[0] -= ratio * (q[0] - inflow);
      for (std::size_t i = 1; i < n; ++i) a[i] -= ratio * (q[i] - q[i - 1]);
    }
    best = std::max(best, static_cast<double>(cells) * sweeps / seconds_since(start));
  }
  if (a[n / 2] < 0.0) std::puts("");  // consume the result
  return best;
}

// The single long reach of issue 16: rectangular, 50 m wide, n 0.035, S0 0.001, 20 km in
// `cells` cells; inflow 20 -> 500 m3/s at 2 h -> 20 m3/s at 6 h; 12 h; explicit upwind at
// Courant 0.9, advanced in 60 s steps as a network driver calls a reach, the outlet read after
// each. Cell updates per second of wall time for the whole loop (best of 3), with the grid
// shock detector on (the default) and off.
void bench_long_reach(int cells) {
  const geometry::RectangularFlux law(50.0, 0.035, 0.001);
  const PiecewiseLinearSeries inflow({0.0, 7200.0, 21600.0}, {20.0, 500.0, 20.0});
  for (const bool shocks : {true, false}) {
    double best = 0.0, peak = 0.0;
    for (int r = 0; r < 3; ++r) {
      RoutingOptions opt;
      opt.scheme = SchemeKind::kExplicitUpwind;
      opt.courant_target = 0.9;
      opt.shock.enabled = shocks;
      KinematicReach<geometry::RectangularFlux> reach({"long", 20000.0, cells}, law, opt);
      reach.set_uniform_discharge(20.0);
      peak = 0.0;
      const auto start = Clock::now();
      for (double t = 0.0; t < 43200.0; t += 60.0) {
        (void)reach.advance(t, t + 60.0, inflow, LateralInflow::none());
        peak = std::max(peak, reach.face_flux_m3s().back());
      }
      const double wall = seconds_since(start);
      best = std::max(best, static_cast<double>(reach.diagnostics().cell_updates) / wall);
    }
    std::printf("long-reach cells=%d shock-detection=%s cell-updates/s=%.4g outlet-peak=%.2f\n",
                cells, shocks ? "on" : "off", best, peak);
  }
}

template <class Law>
void bench_law(const char* name, const Law& law, int cells, double base_q, int repeats) {
  const double bare = bare_rate(law, cells, base_q, 400, repeats);
  std::printf("\n%s: bare Q(A) loop %.3g evaluations/s\n", name, bare);
  std::printf("  %-26s %14s %9s %14s %10s %9s\n", "scheme", "cell-upd/s", "vs bare",
              "step cost", "B/cell", "Courant");
  const Measured explicit_run =
      run_scheme(law, cells, SchemeKind::kExplicitUpwind, 10.0, base_q, repeats);
  struct Row {
    const char* label;
    SchemeKind scheme;
    double courant;
  };
  const Row rows[] = {{"explicit-upwind", SchemeKind::kExplicitUpwind, 10.0},
                      {"implicit-upwind (C=10)", SchemeKind::kImplicitUpwind, 10.0},
                      {"muscl-heun (per stage)", SchemeKind::kMusclHeun, 10.0},
                      {"method-of-lines", SchemeKind::kMethodOfLines, 10.0}};
  for (const Row& row : rows) {
    const Measured m = row.scheme == SchemeKind::kExplicitUpwind
                           ? explicit_run
                           : run_scheme(law, cells, row.scheme, row.courant, base_q, repeats);
    std::printf("  %-26s %14.4g %9.3f %13.2fx %10.1f %9.2f\n", row.label, m.cell_updates_per_s,
                m.cell_updates_per_s / bare, m.seconds_per_step / explicit_run.seconds_per_step,
                m.bytes_per_cell, m.max_courant);
  }
}

// P1 (issue 15): a 20 km rectangular channel, 50 m wide, n 0.035, S0 0.001, inflow
// 20 -> 500 -> 20 m3/s over 6 h, routed for 8 h in 60 s coupling steps (as a network driver
// calls a reach), the outlet sampled at the end of every step. Exact outlet peak 500 m3/s at
// 3 h + L / c(A_500) = 276.34 min (tests/routing/characteristics_test.cpp).
struct P1Run {
  double peak_m3s = 0.0;
  double peak_time_s = 0.0;
  double cpu_s = 0.0;
  int max_fronts = 0;
};

// The P1 reach: a kinematic scheme on the rectangle's flux law, or the diffusion wave
// (muskingum-cunge), which also reads the section's top width and the bed slope.
std::unique_ptr<ReachModel> p1_reach(SchemeKind scheme, int cells, const RoutingOptions& opt) {
  const ReachSpec spec{"P1", 20000.0, cells};
  if (scheme == SchemeKind::kMuskingumCunge) {
    return make_reach(spec,
                      geometry::make_flow_section(
                          geometry::RectangularSpec{.bottom_width_m = 50.0, .manning_n = 0.035},
                          0.001),
                      opt);
  }
  return std::make_unique<KinematicReach<geometry::RectangularFlux>>(
      spec, geometry::RectangularFlux(50.0, 0.035, 0.001), opt);
}

P1Run run_p1(SchemeKind scheme, int cells, int repeats, double node_spacing = 1e-3) {
  const PiecewiseLinearSeries inflow({0.0, 10800.0, 21600.0}, {20.0, 500.0, 20.0});
  P1Run best;
  best.cpu_s = 1e300;
  for (int r = 0; r < repeats; ++r) {
    RoutingOptions opt;
    opt.scheme = scheme;
    opt.front_node_spacing = node_spacing;
    opt.shock.enabled = false;  // the routing alone, for every scheme alike
    const std::unique_ptr<ReachModel> reach = p1_reach(scheme, cells, opt);
    reach->set_uniform_discharge(20.0);
    P1Run run;
    const std::clock_t start = std::clock();
    for (double t = 0.0; t < 28800.0; t += 60.0) {
      (void)reach->advance(t, t + 60.0, inflow, LateralInflow::none());
      const double q = reach->face_flux_m3s().back();
      if (q > run.peak_m3s) run.peak_m3s = q, run.peak_time_s = t + 60.0;
    }
    run.cpu_s = static_cast<double>(std::clock() - start) / CLOCKS_PER_SEC;
    run.max_fronts = reach->diagnostics().max_fronts;
    if (run.cpu_s < best.cpu_s) best = run;
  }
  return best;
}

void bench_p1(int repeats) {
  std::printf("\nP1: 20 km rectangular 50 m, n 0.035, S0 0.001, inflow 20 -> 500 -> 20 m3/s "
              "over 6 h, 60 s coupling;\n    exact outlet peak 500 m3/s at 276.34 min; outlet "
              "sampled every 60 s; grid shock detection off; CPU time, best of %d\n", repeats);
  std::printf("  %-18s %7s %11s %9s %10s %11s\n", "scheme", "cells", "peak m3/s", "error %",
              "peak min", "CPU s");
  double explicit_cpu = -1.0;
  int explicit_cells = 0;
  for (int cells : {150, 300, 600, 1200, 2400}) {
    const P1Run e = run_p1(SchemeKind::kExplicitUpwind, cells, repeats);
    const double error = 100.0 * (e.peak_m3s / 500.0 - 1.0);
    std::printf("  %-18s %7d %11.3f %9.3f %10.1f %11.4g\n", "explicit-upwind", cells, e.peak_m3s,
                error, e.peak_time_s / 60.0, e.cpu_s);
    if (explicit_cpu < 0.0 && std::abs(error) <= 0.5) explicit_cpu = e.cpu_s, explicit_cells = cells;
  }
  const P1Run m = run_p1(SchemeKind::kMusclHeun, 600, repeats);
  std::printf("  %-18s %7d %11.3f %9.3f %10.1f %11.4g\n", "muscl-heun", 600, m.peak_m3s,
              100.0 * (m.peak_m3s / 500.0 - 1.0), m.peak_time_s / 60.0, m.cpu_s);
  // The diffusion wave attenuates the peak physically (Q / (2 B S0) = 5000 m2/s at 500 m3/s):
  // its "error" against the kinematic peak is that attenuation, not a fault.
  for (int cells : {150, 600}) {
    const P1Run d = run_p1(SchemeKind::kMuskingumCunge, cells, repeats);
    std::printf("  %-18s %7d %11.3f %9.3f %10.1f %11.4g   (diffusion wave: attenuates)\n",
                "muskingum-cunge", cells, d.peak_m3s, 100.0 * (d.peak_m3s / 500.0 - 1.0),
                d.peak_time_s / 60.0, d.cpu_s);
  }
  P1Run c;
  for (double spacing : {1e-3, 3e-3}) {
    const P1Run run = run_p1(SchemeKind::kCharacteristics, 100, repeats, spacing);
    std::printf("  %-18s %7s %11.3f %9.3f %10.1f %11.4g   (node spacing %.0e, %d fronts at most)\n",
                "characteristics", "100*", run.peak_m3s, 100.0 * (run.peak_m3s / 500.0 - 1.0),
                run.peak_time_s / 60.0, run.cpu_s, spacing, run.max_fronts);
    if (spacing == 1e-3) c = run;
  }
  std::printf("  * sampling cells only (exact cell averages of the fronts)\n");
  if (explicit_cpu > 0.0) {
    std::printf("  CPU explicit-upwind at %d cells (the first grid within 0.5 %% of the peak) / "
                "characteristics (default node spacing): %.0fx\n", explicit_cells,
                explicit_cpu / c.cpu_s);
  }
}

}  // namespace

int main(int argc, char** argv) {
  const auto positive = [](const char* text, int fallback) {
    char* end = nullptr;
    const long v = std::strtol(text, &end, 10);
    return (end && *end == '\0' && v > 0 && v <= 10'000'000) ? static_cast<int>(v) : -fallback;
  };
  if (argc > 1 && std::string(argv[1]) == "--bare-update") {
    const int n = argc > 2 ? positive(argv[2], 1) : 50000;
    if (n < 0 || argc > 3) {
      std::printf("usage: freshet-bench --bare-update [CELLS]   (default 50000)\n");
      return 1;
    }
    std::printf("bare-update %.6g\n", bare_update_rate(n));
    return 0;
  }
  if (argc > 1 && std::string(argv[1]) == "--long-reach") {
    const int n = argc > 2 ? positive(argv[2], 1) : 2000;
    if (n < 0 || argc > 3) {
      std::printf("usage: freshet-bench --long-reach [CELLS]   (default 2000)\n");
      return 1;
    }
    bench_long_reach(n);
    return 0;
  }
  const int cells = argc > 1 ? positive(argv[1], 1) : 20000;
  const int repeats = argc > 2 ? positive(argv[2], 1) : 3;
  if (argc > 3 || cells < 0 || repeats < 0) {
    std::printf("usage: freshet-bench [CELLS [REPEATS]]   (defaults 20000 and 3; positive "
                "integers)\nTimes the routing schemes on a long reach; see docs/performance.md.\n");
    return argc > 1 && (std::string(argv[1]) == "--help" || std::string(argv[1]) == "-h") ? 0 : 1;
  }
  std::printf("freshet-bench: %d cells (dx = 10 m), best of %d; step cost relative to explicit\n",
              cells, repeats);
  const double slope = 0.002;
  bench_law("wide channel, power law Q = alpha A^(5/3)",
            geometry::PowerLawFlux(std::sqrt(slope) / (0.03 * std::pow(20.0, 2.0 / 3.0)), 5.0 / 3.0),
            cells, 5.0, repeats);
  bench_law("rectangular 20 m (RectangularFlux)", geometry::RectangularFlux(20.0, 0.03, slope),
            cells, 5.0, repeats);
  bench_law("trapezoidal 3 m, 2:1 (TrapezoidalFlux)",
            geometry::TrapezoidalFlux(3.0, 2.0, 2.0, 0.03, slope), cells, 5.0, repeats);
  const auto pipe = geometry::make_section(geometry::CircularSpec{2.0, 0.013});
  bench_law("circular 2 m pipe (TabulatedFlux)",
            geometry::TabulatedFlux::from_section(*pipe, slope), cells, 0.5, repeats);
  bench_p1(repeats);
  return 0;
}
