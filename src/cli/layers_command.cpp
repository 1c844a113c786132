// freshet layers: a basin file from a settings file ([study], storms, scenarios) and GeoJSON
// layers of subcatchments, reaches and points (freshet/study/layers.hpp). The file is
// written under a temporary name, read back as `freshet check` reads it, and renamed into
// place only when it reads clean; any problem is located in the layer or settings file.
#include <algorithm>
#include <fstream>
#include <iostream>
#include <sstream>

#include <toml++/toml.h>

#include "commands.hpp"
#include "freshet/io/atomic_file.hpp"
#include "freshet/study/layers.hpp"
#include "freshet/study/study.hpp"

namespace freshet::cli {

namespace {

struct LayersArgs {
  std::string settings;
  study::LayerSources sources;
  std::string subcatchments, reaches, points;
  std::string output;
  bool overwrite = false;
};

std::string read_settings(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    throw InputError(Problem{path, 0, 0, "", "", "cannot open the settings file"});
  }
  std::ostringstream text;
  text << in.rdbuf();
  std::string s = text.str();
  if (!s.empty() && s.back() != '\n') s += '\n';
  return s;
}

units::System settings_units(const std::string& text) {
  try {
    const toml::table root = toml::parse(text);
    const auto system = units::parse_system(root["study"]["units"].value_or(std::string("si")));
    return system.value_or(units::System::si);
  } catch (const toml::parse_error&) {
    return units::System::si;  // the read-back below reports the settings file's syntax
  }
}

int layers(const LayersArgs& a) {
  const std::string settings = read_settings(a.settings);
  study::LayerSources src = a.sources;
  src.subcatchments = a.subcatchments;
  src.reaches = a.reaches;
  src.points = a.points;
  const study::LayerTables tables = study::build_layer_tables(src, settings_units(settings));
  const int settings_lines =
      static_cast<int>(std::count(settings.begin(), settings.end(), '\n')) + 2;
  io::AtomicOutputPath out(a.output, a.overwrite ? io::Overwrite::yes : io::Overwrite::no);
  {
    std::ofstream file(out.partial_path(), std::ios::binary);
    file << settings << "\n# ---- elements built from GeoJSON layers by freshet layers ----\n"
         << tables.text;
    file.close();
    if (!file) throw IoError("cannot write '" + out.partial_path().string() + "'");
  }
  try {
    (void)study::Study::load(out.partial_path());
  } catch (const InputError& e) {
    std::vector<Problem> problems = study::locate_in_layers(e.problems(), tables,
                                                            out.partial_path(),
                                                            settings_lines, a.settings);
    for (Problem& p : problems) {
      if (p.file == out.partial_path().string()) p.file = a.output;
    }
    throw InputError(std::move(problems));
  }
  out.commit();
  std::cout << a.output << ": " << tables.subcatchments << " subcatchment(s), "
            << tables.reaches << " reach(es), " << tables.points
            << " point element(s) from the layers; areas and lengths are geodesic (WGS 84). "
               "Check it with: freshet check "
            << a.output << "\n";
  return kExitOk;
}

}  // namespace

void add_layers_command(CLI::App& app, const GlobalOptions& /*global*/, Action& action) {
  auto args = std::make_shared<LayersArgs>();
  auto* cmd = app.add_subcommand(
      "layers",
      "Build a basin file from a settings file and GeoJSON layers (RFC 7946).\n"
      "Example: freshet layers basins/layers/settings.toml --subcatchments "
      "basins/layers/subcatchments.geojson --reaches basins/layers/reaches.geojson "
      "--points basins/layers/points.geojson --out basins/my-study.toml");
  cmd->add_option("settings", args->settings,
                  "TOML file with [study], storms and scenarios; copied to the top of the output")
      ->required()
      ->check(kNonEmptyPath);
  cmd->add_option("--subcatchments", args->subcatchments, "GeoJSON layer of Polygon features")
      ->check(kNonEmptyPath);
  cmd->add_option("--reaches", args->reaches, "GeoJSON layer of LineString features (reaches, pipes)")
      ->check(kNonEmptyPath);
  cmd->add_option("--points", args->points,
                  "GeoJSON layer of Point features (junction, culvert, detention, outlet, inflow)")
      ->check(kNonEmptyPath);
  cmd->add_option("--tolerance", args->sources.tolerance_m,
                  "Distance (m, geodesic) within which line ends and points meet (default 1)")
      ->check(CLI::PositiveNumber);
  cmd->add_option("--out", args->output, "Basin file to write")->required()->check(kNonEmptyPath);
  cmd->add_flag("--overwrite", args->overwrite, "Replace the output file if it exists");
  cmd->callback([&action, args] { action = [args] { return layers(*args); }; });
}

}  // namespace freshet::cli
