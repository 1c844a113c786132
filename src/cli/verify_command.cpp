// `freshet verify`: runs the verification cases (freshet/verification/verification_case.hpp) and prints
// a report an engineer can attach to a submission: a header naming the freshet version, the
// date and the machine; one row per case with the published value, freshet's value, the
// tolerance, pass/fail and the source; the closing line "N passed, N failed"; the caution.
// Exit 0 when every case passes, 5 (kExitVerifyFailed) otherwise, naming the failures on
// stderr. Self-test hook: FRESHET_VERIFY_PERTURB=<id>[,<id>...] multiplies those cases'
// published values by 1.1 so the failure path can be exercised (docs/verification.md).
#include <sys/utsname.h>

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <ctime>
#include <filesystem>
#include <iostream>
#include <memory>
#include <set>
#include <string>
#include <vector>

#include "commands.hpp"
#include "freshet/core/caution.hpp"
#include "freshet/core/error.hpp"
#include "freshet/io/atomic_file.hpp"
#include "freshet/verification/verification_case.hpp"
#include "freshet_version.hpp"

namespace freshet::cli {
namespace {

using verification::CaseResult;
using verification::ToleranceKind;
using verification::VerificationCase;
using verification::run_case;
using verification::verification_cases;

constexpr double kPerturbFactor = 1.1;
constexpr const char* kPerturbVariable = "FRESHET_VERIFY_PERTURB";

struct VerifyArgs {
  std::string out;
  bool overwrite = false;
  bool list = false;
};

enum class ReportFormat { text, markdown };

// Case ids named in FRESHET_VERIFY_PERTURB (comma-separated); unknown ids are bad input.
std::set<std::string> perturbed_case_ids() {
  std::set<std::string> ids;
  const char* value = std::getenv(kPerturbVariable);
  if (value == nullptr) return ids;
  std::string text(value);
  for (std::size_t start = 0; start <= text.size();) {
    const std::size_t comma = std::min(text.find(',', start), text.size());
    if (comma > start) ids.insert(text.substr(start, comma - start));
    start = comma + 1;
  }
  ProblemList problems("environment");
  for (const std::string& id : ids) {
    if (verification::find_case(id) == nullptr) problems.add(kPerturbVariable, "= '" + id + "': not a case id (see --list)");
  }
  problems.throw_if_any();
  return ids;
}

std::string format_number(double value) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.7g", value);
  return buf;
}

std::string format_tolerance(const VerificationCase& c) {
  char buf[32];
  if (c.tolerance_kind == ToleranceKind::relative) {
    std::snprintf(buf, sizeof buf, "+-%g %%", c.tolerance * 100.0);
  } else {
    std::snprintf(buf, sizeof buf, "+-%g", c.tolerance);
  }
  return buf;
}

std::string utc_now() {
  const std::time_t now = std::time(nullptr);
  std::tm tm{};
  gmtime_r(&now, &tm);
  char buf[32];
  std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", &tm);
  return buf;
}

std::string machine_text() {
  utsname u{};
  if (uname(&u) != 0) return "unknown";
  return std::string(u.sysname) + " " + u.release + " " + u.machine + ", host " + u.nodename;
}

// Wraps `text` at spaces into lines of at most `width` characters.
std::string wrapped(std::string_view text, std::size_t width) {
  std::string out, line;
  std::size_t start = 0;
  while (start < text.size()) {
    const std::size_t space = std::min(text.find(' ', start), text.size());
    const std::string_view word = text.substr(start, space - start);
    if (!line.empty() && line.size() + 1 + word.size() > width) {
      out += line + "\n";
      line.clear();
    }
    line += (line.empty() ? "" : " ") + std::string(word);
    start = space + 1;
  }
  return out + line;
}

using Row = std::vector<std::string>;

Row header_row() {
  return {"case", "quantity", "unit", "published", "freshet", "tolerance", "status", "source"};
}

Row result_row(const CaseResult& r) {
  const VerificationCase& c = *r.verification_case;
  std::string status = r.passed ? "pass" : "FAIL";
  if (!r.error.empty()) status += " (error: " + r.error + ")";
  return {std::string(c.id),         std::string(c.quantity), std::string(c.unit),
          format_number(r.published), format_number(r.freshet), format_tolerance(c),
          status,                     std::string(c.source)};
}

// Columns padded to their widest cell, except the last (the source).
std::string text_table(const std::vector<Row>& rows) {
  std::vector<std::size_t> width(rows.front().size(), 0);
  for (const Row& row : rows) {
    for (std::size_t k = 0; k < row.size(); ++k) width[k] = std::max(width[k], row[k].size());
  }
  std::string out;
  for (const Row& row : rows) {
    for (std::size_t k = 0; k < row.size(); ++k) {
      out += row[k];
      if (k + 1 < row.size()) out += std::string(width[k] - row[k].size() + 2, ' ');
    }
    out += "\n";
  }
  return out;
}

std::string markdown_table(const std::vector<Row>& rows) {
  std::string out;
  for (std::size_t i = 0; i < rows.size(); ++i) {
    out += "|";
    for (const std::string& cell : rows[i]) out += " " + cell + " |";
    out += "\n";
    if (i == 0) {
      out += "|";
      for (std::size_t k = 0; k < rows[i].size(); ++k) out += " --- |";
      out += "\n";
    }
  }
  return out;
}

std::string report_header(ReportFormat format, std::size_t case_count,
                          const std::set<std::string>& perturbed) {
  const std::string bullet = format == ReportFormat::markdown ? "- " : "";
  std::string out = format == ReportFormat::markdown ? "# freshet verification report\n\n"
                                                     : "freshet verification report\n";
  out += bullet + "freshet version: " + FRESHET_VERSION + " (" + FRESHET_BUILD_TYPE + " build, " +
         FRESHET_COMPILER + ", C++20)\n";
  out += bullet + "date: " + utc_now() + "\n";
  out += bullet + "machine: " + machine_text() + "\n";
  out += bullet + "cases: " + std::to_string(case_count) +
         ", each computed live and compared with the published value; values in the unit "
         "shown\n";
  if (!perturbed.empty()) {
    std::string ids;
    for (const std::string& id : perturbed) ids += (ids.empty() ? "" : ", ") + id;
    out += bullet + "SELF-TEST: " + kPerturbVariable + " multiplied the published value of " +
           ids + " by 1.1; this report is not a verification record\n";
  }
  return out + "\n";
}

std::string format_report(const std::vector<CaseResult>& results, ReportFormat format,
                          const std::set<std::string>& perturbed) {
  std::vector<Row> rows{header_row()};
  int failed = 0;
  for (const CaseResult& r : results) {
    rows.push_back(result_row(r));
    failed += r.passed ? 0 : 1;
  }
  std::string out = report_header(format, results.size(), perturbed);
  out += format == ReportFormat::markdown ? markdown_table(rows) : text_table(rows);
  out += "\n" + std::to_string(static_cast<int>(results.size()) - failed) + " passed, " +
         std::to_string(failed) + " failed\n\n";
  return out + wrapped(kCautionText, 96) + "\n";
}

int list_cases() {
  std::vector<Row> rows{{"case", "module", "quantity", "unit", "source"}};
  for (const auto& c : verification_cases()) {
    rows.push_back({std::string(c.id), std::string(c.module), std::string(c.quantity),
                    std::string(c.unit), std::string(c.source)});
  }
  std::cout << text_table(rows);
  return kExitOk;
}

int run_verify(const VerifyArgs& args) {
  if (args.list) return list_cases();
  if (!args.out.empty()) {
    io::require_absent(args.out, args.overwrite ? io::Overwrite::yes : io::Overwrite::no);
  }
  const std::set<std::string> perturbed = perturbed_case_ids();
  std::vector<CaseResult> results;
  for (const auto& c : verification_cases()) {
    const bool perturb = perturbed.count(std::string(c.id)) > 0;
    results.push_back(run_case(c, perturb ? kPerturbFactor : 1.0));
  }
  std::cout << format_report(results, ReportFormat::text, perturbed);
  if (!args.out.empty()) {
    const std::filesystem::path path(args.out);
    const ReportFormat format =
        path.extension() == ".md" ? ReportFormat::markdown : ReportFormat::text;
    io::write_file_atomically(path, format_report(results, format, perturbed),
                              args.overwrite ? io::Overwrite::yes : io::Overwrite::no);
  }
  std::string failures;
  for (const CaseResult& r : results) {
    if (!r.passed) failures += (failures.empty() ? "" : ", ") + std::string(r.verification_case->id);
  }
  if (failures.empty()) return kExitOk;
  std::cerr << "freshet verify: failed: " << failures << "\n";
  return kExitVerifyFailed;
}

}  // namespace

void add_verify_command(CLI::App& app, const GlobalOptions& /*global*/, Action& action) {
  auto* cmd = app.add_subcommand(
      "verify",
      "Run the built-in verification cases against published values and print a report\n"
      "(exit 0 when all pass, 5 when any fails)");
  auto args = std::make_shared<VerifyArgs>();
  cmd->add_option("--out", args->out,
                  "Also write the report to this file (Markdown when it ends in .md, text "
                  "otherwise; written atomically)")
      ->check(kNonEmptyPath);
  cmd->add_flag("--overwrite", args->overwrite, "Replace an existing --out file");
  cmd->add_flag("--list", args->list, "List the cases and their sources without running them");
  cmd->footer(
      "Examples:\n"
      "  freshet verify\n"
      "  freshet verify --out verification-report.md\n"
      "  freshet verify --list\n"
      "The cases and their sources are described in docs/verification.md.\n");
  cmd->callback([&action, args] { action = [args] { return run_verify(*args); }; });
}

}  // namespace freshet::cli
