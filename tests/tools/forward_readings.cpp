// Prints spreadfit's forward readings of the channel or plate rig of tests/reference/ at chosen numerical settings
// (cells, stepper tolerance), one per line, for the SciPy reference check (tests/reference/): `simulate` always
// uses the defaults, and the check also needs spreadfit's own converged solution.
// Usage: spreadfit_forward_readings channel|plate TAU_Y K N CELLS REL_TOL T1,T2,...
#include <cstdio>
#include <cstdlib>
#include <sstream>
#include <string>
#include <vector>

#include "models/forward.hpp"

using namespace spreadfit;

int main(int argc, char** argv) {
  if (argc != 8) {
    std::fprintf(stderr, "usage: %s channel|plate TAU_Y K N CELLS REL_TOL T1,T2,...\n", argv[0]);
    return 2;
  }
  TestSetup setup;
  const std::string rig = argv[1];
  if (rig == "channel") {  // the bench's channel: 5 cm wide, 5 cm block, 100 mL, 1100 kg/m^3, side walls
    setup.rig = ChannelRig{0.05, 0.05, 1e-4, true};
    setup.density = 1100;
    setup.reading = Reading::Front;
  } else if (rig == "plate") {  // the bench's plate: ring 3 cm, 60 mL, 1000 kg/m^3
    setup.rig = PlateRig{0.03, 6e-5};
    setup.density = 1000;
    setup.reading = Reading::Radius;
  } else {
    std::fprintf(stderr, "rig must be channel or plate\n");
    return 2;
  }
  const Material material{std::atof(argv[2]), std::atof(argv[3]), std::atof(argv[4])};
  ForwardOptions options;
  options.cells = std::atoi(argv[5]);
  options.rel_tol = std::atof(argv[6]);
  std::vector<double> times;
  std::stringstream list(argv[7]);
  for (std::string item; std::getline(list, item, ',');) times.push_back(std::atof(item.c_str()));
  try {
    const ForwardResult r = predict_readings(setup, material, times, options);
    if (!r.ok()) {
      std::fprintf(stderr, "%s\n", r.message.c_str());
      return 3;
    }
    for (double v : r.readings) std::printf("%.17g\n", v);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "%s\n", e.what());
    return 2;
  }
  return 0;
}
