#include "batch.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstdio>
#include <exception>
#include <filesystem>
#include <iostream>
#include <mutex>
#include <set>
#include <sstream>
#include <thread>

#include "freshet/core/caution.hpp"
#include "freshet/core/error.hpp"
#include "commands.hpp"
#include "progress.hpp"
#include "stop_signals.hpp"

namespace freshet::cli {

study::Study load_basin(const std::string& basin) {
  std::error_code ec;
  const std::filesystem::file_status status = std::filesystem::status(basin, ec);
  const char* why = !std::filesystem::exists(status)       ? "it does not exist"
                    : std::filesystem::is_directory(status) ? "it is a folder"
                                                            : nullptr;
  if (why != nullptr) {
    throw InputError(Problem{basin, 0, 0, "", "", std::string("cannot open the basin file: ") + why});
  }
  return study::Study::load(basin);
}

void add_run_options(CLI::App* cmd, RunArgs& args) {
  cmd->add_option("basin", args.basin, "Basin file (TOML)")->required();
  cmd->add_option("-s,--storm", args.storms, "Storm id to run (repeatable; default: all)");
  cmd->add_option("-o,--out", args.out_dir, "Output folder (default: out/<basin name>)")
      ->check(kNonEmptyPath);
  cmd->add_flag("--overwrite", args.overwrite, "Replace existing result files");
  cmd->add_option("-j,--jobs", args.jobs, "Threads: runs in parallel, and a run's independent subtrees when there are fewer runs (default 2)")->check(CLI::Range(1, 64));
}

BatchOptions batch_options(const RunArgs& args, bool quiet) {
  BatchOptions options;
  options.out_dir = args.out_dir.empty()
                        ? std::filesystem::path("out") / std::filesystem::path(args.basin).stem()
                        : std::filesystem::path(args.out_dir);
  options.overwrite = args.overwrite ? io::Overwrite::yes : io::Overwrite::no;
  options.jobs = args.jobs;
  options.quiet = quiet;
  return options;
}

std::vector<std::string> storm_ids(const study::Study& study, const RunArgs& args) {
  std::vector<std::string> storms = unique_in_order(args.storms);
  if (storms.empty()) {
    for (const auto& s : study.storms()) storms.push_back(s.id);
  }
  for (const auto& id : storms) (void)study.storm(id);
  return storms;
}

std::vector<std::string> unique_in_order(const std::vector<std::string>& items) {
  std::vector<std::string> out;
  for (const auto& item : items) {
    if (std::find(out.begin(), out.end(), item) == out.end()) out.push_back(item);
  }
  return out;
}

std::vector<study::RunOutcome> run_batch(const study::Study& study,
                                      const std::vector<study::RunRequest>& requests,
                                      const BatchOptions& options) {
  // Lock every output folder first (another freshet process writing there stops this command
  // before anything is routed), and report what killed runs had left there.
  std::vector<io::OutputFolderLock::Handle> locks;
  for (const auto& request : requests) {
    locks.push_back(io::OutputFolderLock::acquire(study::run_folder(request)));
    for (const auto& left : locks.back()->removed_leftovers()) {
      std::cerr << "freshet: removed '" << left.string()
                << "', left by an earlier run that was killed before it finished\n";
    }
  }
  // Refuse before any routing when a run would meet an existing result (without --overwrite)
  // or route a storm that outlasts the run.
  std::set<std::filesystem::path> planned;
  for (const auto& request : requests) {
    study::check_run_request(study, request);
    for (const auto& path : study::planned_output_files(study, request)) {
      if (!planned.insert(path).second) {
        throw UsageError("two runs of this command would both write '" + path.string() +
                         "'; route these runs in separate commands with their own --out, or "
                         "rename a storm or element so that the file names differ");
      }
    }
  }
  const std::size_t n = requests.size();
  std::vector<study::RunOutcome> results(n);
  std::vector<std::exception_ptr> errors(n);
  std::vector<double> fraction(n, 0.0);
  std::mutex fraction_mutex;
  Progress progress("freshet: routing " + std::to_string(n) + " run(s)", options.quiet);
  std::atomic<std::size_t> next{0};
  // Runs share the threads; with fewer runs than threads, each run uses the spare ones for
  // its own independent subtrees (same results as on one thread, bit for bit).
  const auto threads = static_cast<std::size_t>(std::max(1, options.jobs));
  const int threads_per_run = static_cast<int>(threads / std::max<std::size_t>(1, std::min(threads, n)));

  auto worker = [&] {
    for (std::size_t k = next++; k < n; k = next++) {
      try {
        if (stop_requested()) throw study::RunInterrupted("the run was stopped before it started");
        study::RunRequest request = requests[k];
        request.threads = threads_per_run;
        results[k] = study::run_study(study, request, [&, k](double f) {
          double total = 0.0;
          {
            std::lock_guard lock(fraction_mutex);
            fraction[k] = f;
            for (double x : fraction) total += x;
          }
          progress.update(total / static_cast<double>(n));
        }, [] { return stop_requested(); });
      } catch (...) {
        errors[k] = std::current_exception();
      }
    }
  };
  std::vector<std::thread> pool;
  for (std::size_t t = 1; t < std::min(threads, n); ++t) pool.emplace_back(worker);
  worker();
  for (auto& t : pool) t.join();
  progress.finish();
  for (const auto& e : errors) {
    if (e) std::rethrow_exception(e);
  }
  return results;
}

std::string clock_hm(double seconds) {
  if (!std::isfinite(seconds)) return "-";
  const long minutes = std::lround(seconds / 60.0);
  char buf[32];
  std::snprintf(buf, sizeof buf, "%ld:%02ld", minutes / 60, minutes % 60);
  return buf;
}

std::string number(double value, int digits) {
  if (!std::isfinite(value)) return "-";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", digits, value);
  return buf;
}

std::string cell(const std::string& text, std::size_t width, bool right) {
  if (text.size() >= width) return text.substr(0, width);
  const std::string pad(width - text.size(), ' ');
  return right ? pad + text : text + pad;
}

std::string format_critical_storms(const std::vector<study::RunOutcome>& runs,
                                   const std::vector<reporting::StationDescription>& stations) {
  std::ostringstream out;
  out << "Critical storm at each point (highest peak discharge, m3/s):\n";
  out << cell("point", 22);
  for (const auto& r : runs) out << cell(r.storm_id, 14, true);
  out << "  critical storm\n";
  for (std::size_t i = 0; i < stations.size(); ++i) {
    out << cell(stations[i].id, 22);
    std::size_t best = 0;
    for (std::size_t k = 0; k < runs.size(); ++k) {
      const double q = runs[k].peaks[i].peak_discharge_m3s;
      out << cell(number(q, 3), 14, true);
      if (q > runs[best].peaks[i].peak_discharge_m3s) best = k;
    }
    out << "  " << runs[best].storm_id << "\n";
  }
  return out.str();
}

std::string format_notes(const study::RunOutcome& run) {
  std::ostringstream out;
  for (const auto& [id, note] : run.notes) out << "  " << id << ": " << note << "\n";
  return out.str();
}

std::string format_input_warnings(const study::Study& study, std::string_view indent) {
  std::string out;
  for (const Problem& w : study.warnings()) {
    out += std::string(indent) + "warning: " + w.to_string() + "\n";
  }
  return out;
}

void record_runs(io::CommandResult& result, const study::Study& study, const std::string& basin,
                 const std::vector<study::RunOutcome>& runs,
                 const std::vector<std::filesystem::path>& extra_files) {
  result.basin = basin;
  for (const Problem& w : study.warnings()) result.input_warnings.push_back(w.to_string());
  for (const study::RunOutcome& r : runs) {
    result.runs.push_back({r.scenario_id, r.storm_id, r.summary});
    for (const auto& f : r.files) result.files.push_back(f.string());
  }
  for (const auto& f : extra_files) result.files.push_back(f.string());
}

std::string wrapped_caution() {
  std::string out;
  std::size_t line = 0;
  std::istringstream words{std::string(kCautionText)};
  for (std::string w; words >> w;) {
    if (line + w.size() + 1 > 92 && line > 0) {
      out += "\n";
      line = 0;
    } else if (line > 0) {
      out += " ";
      ++line;
    }
    out += w;
    line += w.size();
  }
  return out + "\n";
}

}  // namespace freshet::cli
