// Rain over an area: a weighted mix of gauge hyetographs (each subcatchment's share of each
// gauge, e.g. Thiessen weights), and the areal reduction factor that turns a point design
// depth into a catchment-average one.
//
//   Hyetograph mix = mix_hyetographs({{0.7, &north}, {0.3, &south}}, "subcatchment 'a' rain");
//   double arf = tp29_areal_reduction_factor(250e6, 6.0 * 3600.0);   // 250 km2, 6 h: 0.889
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "freshet/hydrology/hyetograph.hpp"

namespace freshet::hydrology {

// sum_g w_g P_g(t): blocks at the union of the gauges' block boundaries, each block's depth
// the weighted sum of the gauges' depths over it. Exact for blocks of constant intensity (the
// cumulative depths are piecewise linear): the mix's total is sum_g w_g total_g to round-off.
// Weights must be finite and >= 0 (InputError naming `what`); they need not sum to 1 here.
Hyetograph mix_hyetographs(const std::vector<std::pair<double, const Hyetograph*>>& weighted,
                           const std::string& what);

// Areal reduction factor of the depth-area curves of US Weather Bureau Technical Paper No. 29
// (1958, "Rainfall intensity-frequency regime"; reproduced in TP-40, Hershfield 1961), in the
// closed form fitted to them by Leclerc & Schaake (1972, MIT Ralph M. Parsons Lab. Report
// 142): ARF = 1 - exp(-1.1 t^0.25) + exp(-1.1 t^0.25 - 0.01 A), t the duration in hours and
// A the area in square miles (from memory: the constants were not checked against the
// report). The curves cover 30 min to 24 h and areas up to 400 mi2 (1036 km2); outside that
// the caller refuses (tp29_range_problem).
double tp29_areal_reduction_factor(double area_m2, double duration_s);
// Empty when (area, duration) lies within the curves; otherwise why not.
std::string tp29_range_problem(double area_m2, double duration_s);

}  // namespace freshet::hydrology
