// `spreadfit fit` end to end: readings simulated by the binary itself from a material, fitted back, with the
// result JSON, verdicts and exit codes of the README checked. Sample ids and rigs are invented.
#include <doctest/doctest.h>

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>
#include <vector>

#include "tests/cli/cli_test_support.hpp"
#include "tests/report/svg_test_support.hpp"

namespace {

const char* plate_rig = R"([rig]
kind = "plate"
ring_radius = "3 cm"
volume = "150 mL"
)";

/// Writes a plate test whose readings are the binary's own simulation of `sets` plus the given [spec] text.
std::filesystem::path plate_test(const TempDir& dir, const std::string& id, const std::string& sets,
                                 const std::string& spec, const std::string& product = "LT9") {
  const std::string head =
      "[sample]\nid = \"" + id + "\"\nproduct = \"" + product + "\"\ndensity = \"1.0 g/mL\"\n\n";
  const auto bare = dir.write(id + "-rig.toml", head + plate_rig);
  const Run sim = run_spreadfit(dir, "simulate " + quoted(bare.string()) + " " + sets +
                                         " --times 2,4,6,8,10,15,20,25,30,40,50,60,75,90,105,120");
  REQUIRE(sim.exit_code == 0);
  dir.write(id + ".csv", sim.out);
  return dir.write(id + ".toml", head + plate_rig + "\n[readings]\nfile = \"" + id +
                                     ".csv\"\nresolution = \"0.5 mm\"\n\n" + spec);
}

}  // namespace

TEST_CASE("fit: a simulated Bingham plate test is fitted back and written as JSON") {
  TempDir dir;
  const auto test = plate_test(dir, "LT9-0001",
                               "--model bingham --set yield_stress=20 --set viscosity=5 --set time_origin=0",
                               "[fit]\nmodel = \"bingham\"\n\n[spec]\nyield_stress = [\"15 Pa\", \"25 Pa\"]\n");
  const auto json_file = dir.path() / "LT9-0001.json";
  const Run run = run_spreadfit(dir, "fit " + quoted(test.string()) + " --json " + quoted(json_file.string()));
  INFO(run.out << run.err);
  CHECK(run.exit_code == 0);
  const auto j = nlohmann::json::parse(read_text(json_file));
  CHECK(j["model"] == "bingham");
  CHECK(j["sample"]["id"] == "LT9-0001");
  CHECK(j["parameters"]["yield_stress"]["unit"] == "Pa");
  CHECK(j["parameters"]["yield_stress"]["value"].get<double>() == doctest::Approx(20).epsilon(0.01));
  const auto ci = j["parameters"]["yield_stress"]["ci95"];
  CHECK(ci[0].get<double>() <= ci[1].get<double>());
  CHECK(j["fit"]["converged"] == true);
  CHECK(j["fit"]["points"] == 16);
  CHECK(j["verdict"]["status"] == "pass");
  CHECK(j["software"]["name"] == "spreadfit");
  CHECK(run.out.find("PASS") != std::string::npos);
  CHECK(run.out.find("calibrated rheometer") != std::string::npos);
}

TEST_CASE("fit: out of spec gives exit code 1 and still writes the result") {
  TempDir dir;
  const auto test = plate_test(dir, "LT9-0002",
                               "--model bingham --set yield_stress=12 --set viscosity=5 --set time_origin=0",
                               "[fit]\nmodel = \"bingham\"\n\n[spec]\nyield_stress = [\"15 Pa\", \"25 Pa\"]\n");
  const auto out_dir = dir.path() / "results";
  std::filesystem::create_directory(out_dir);
  const Run run = run_spreadfit(dir, "fit " + quoted(test.string()) + " --out-dir " + quoted(out_dir.string()));
  INFO(run.out << run.err);
  CHECK(run.exit_code == 1);
  const auto j = nlohmann::json::parse(read_text(out_dir / "LT9-0002.json"));
  CHECK(j["verdict"]["status"] == "fail");
  CHECK(j["verdict"]["checks"][0]["pass"] == false);
}

TEST_CASE("fit: a batch list reports each material exactly as a fit of that material alone, in input order") {
  // The materials of a batch list are fitted at the same time; the reference is the same binary fitting each test
  // file on its own (one material, nothing to run beside it): results, table and report files must not differ by a
  // byte, and the batch keeps the order of the command line (README, "Using it"). Materials invented.
  TempDir dir;
  const char* fit_bingham = "[fit]\nmodel = \"bingham\"\n\n[spec]\nyield_stress = [\"5 Pa\", \"40 Pa\"]\n";
  const std::vector<std::filesystem::path> tests{
      plate_test(dir, "LT9-0031", "--model bingham --set yield_stress=22 --set viscosity=4 --set time_origin=0",
                 fit_bingham),
      plate_test(dir, "LT9-0032", "--model bingham --set yield_stress=9 --set viscosity=7 --set time_origin=0",
                 fit_bingham),
      plate_test(dir, "LT9-0033", "--model bingham --set yield_stress=15 --set viscosity=3 --set time_origin=0",
                 fit_bingham)};
  std::string list, alone_out;
  std::vector<nlohmann::json> alone;
  for (const auto& t : tests) {
    list += " " + quoted(t.string());
    const auto folder = dir.path() / ("alone-" + t.stem().string());
    std::filesystem::create_directory(folder);
    const Run one = run_spreadfit(dir, "fit " + quoted(t.string()) + " --out-dir " + quoted(folder.string()));
    INFO(one.out << one.err);
    REQUIRE(one.exit_code == 0);
    alone_out += one.out;
    alone.push_back(nlohmann::json::parse(read_text(folder / (t.stem().string() + ".json"))));
  }
  const auto batch = dir.path() / "batch";
  std::filesystem::create_directory(batch);
  const auto all_json = dir.path() / "all.json";
  const Run run = run_spreadfit(
      dir, "fit" + list + " --out-dir " + quoted(batch.string()) + " --json " + quoted(all_json.string()));
  INFO(run.out << run.err);
  REQUIRE(run.exit_code == 0);
  CHECK(run.out == alone_out);
  const auto all = nlohmann::json::parse(read_text(all_json));
  REQUIRE(all.size() == tests.size());
  for (std::size_t i = 0; i < tests.size(); ++i) {
    const std::string stem = tests[i].stem().string();
    INFO(stem);
    CHECK(all[i] == alone[i]);
    CHECK(read_text(batch / (stem + ".json")) == read_text(dir.path() / ("alone-" + stem) / (stem + ".json")));
    CHECK(read_text(batch / (stem + ".svg")) == read_text(dir.path() / ("alone-" + stem) / (stem + ".svg")));
  }
}

TEST_CASE("fit --db: a batch list fitted on every core reports exactly what one material after another does") {
  // With --db a material's flow-index prior learns from the batches of its product recorded before it, also those of
  // the same run; the batch fits the first material of each product at once and the rest in turn. The reference is
  // the same binary fitting the files one at a time into its own history: every report, result file and the history
  // rows' results must agree, and the sixth batch of LT8 must have learned its prior from the five before it
  // (src/fit/flow_index_prior.hpp: at least 5). Two invented products, interleaved.
  TempDir dir;
  const std::string fit_power = "[fit]\nmodel = \"power-law\"\n";
  struct Batch {
    std::string id, product, sets;
  };
  const std::vector<Batch> batches{
      {"LT8-0001", "LT8", "consistency=6 --set flow_index=0.42"}, {"LT7-0001", "LT7", "consistency=3 --set flow_index=0.6"},
      {"LT8-0002", "LT8", "consistency=7 --set flow_index=0.40"}, {"LT8-0003", "LT8", "consistency=5 --set flow_index=0.44"},
      {"LT8-0004", "LT8", "consistency=6 --set flow_index=0.45"}, {"LT8-0005", "LT8", "consistency=8 --set flow_index=0.39"},
      {"LT7-0002", "LT7", "consistency=2 --set flow_index=0.65"}, {"LT8-0006", "LT8", "consistency=6 --set flow_index=0.43"}};
  std::string list, alone_out;
  std::vector<std::filesystem::path> tests;
  for (const Batch& b : batches) {
    tests.push_back(plate_test(dir, b.id, "--model power-law --set " + b.sets + " --set time_origin=0", fit_power,
                               b.product));
    list += " " + quoted(tests.back().string());
  }
  const auto alone_dir = dir.path() / "alone", batch_dir = dir.path() / "batch";
  std::filesystem::create_directory(alone_dir);
  std::filesystem::create_directory(batch_dir);
  const auto alone_db = dir.path() / "alone.sqlite", batch_db = dir.path() / "batch.sqlite";
  int worst_exit = 0;  // a fit-quality finding fails a batch (exit 1) also without limits
  for (const auto& t : tests) {
    const Run one = run_spreadfit(dir, "fit " + quoted(t.string()) + " --db " + quoted(alone_db.string()) +
                                           " --out-dir " + quoted(alone_dir.string()));
    INFO(one.out << one.err);
    REQUIRE(one.exit_code <= 1);
    worst_exit = std::max(worst_exit, one.exit_code);
    alone_out += one.out;
  }
  const Run run = run_spreadfit(dir, "fit" + list + " --db " + quoted(batch_db.string()) + " --out-dir " +
                                         quoted(batch_dir.string()));
  INFO(run.out << run.err);
  REQUIRE(run.exit_code == worst_exit);
  // The reports name the history file they added to: the same but for the file's name.
  auto with_db = [](std::string text, const std::filesystem::path& db) {
    for (std::size_t at = text.find(db.string()); at != std::string::npos; at = text.find(db.string(), at))
      text.replace(at, db.string().size(), "HISTORY");
    return text;
  };
  CHECK(with_db(run.out, batch_db) == with_db(alone_out, alone_db));
  for (const Batch& b : batches) {
    INFO(b.id);
    CHECK(read_text(batch_dir / (b.id + ".json")) == read_text(alone_dir / (b.id + ".json")));
  }
  const auto sixth = nlohmann::json::parse(read_text(batch_dir / "LT8-0006.json"));
  REQUIRE(sixth["fit"].contains("prior"));
  CHECK(sixth["fit"]["prior"].dump().find("5 earlier batches") != std::string::npos);
  const auto fifth = nlohmann::json::parse(read_text(batch_dir / "LT8-0005.json"));
  CHECK_FALSE(fifth["fit"].contains("prior"));
}

TEST_CASE("fit: a final-only plate reading gives the Roussel & Coussot yield stress") {
  // Roussel & Coussot (2005), J. Rheol. 49: tau_y = 225 rho g V^2 / (128 pi^2 R^5); V = 150 mL, R = 8 cm.
  TempDir dir;
  const auto test = dir.write("final.toml", std::string("[sample]\nid = \"LT9-0003\"\ndensity = \"1000 kg/m3\"\n\n") +
                                                plate_rig + "\n[readings]\nfinal = \"8 cm\"\n");
  const auto json_file = dir.path() / "final.json";
  const Run run = run_spreadfit(dir, "fit " + quoted(test.string()) + " --json " + quoted(json_file.string()));
  INFO(run.out << run.err);
  REQUIRE(run.exit_code == 0);
  const auto j = nlohmann::json::parse(read_text(json_file));
  const double pi = 3.14159265358979;
  const double expected = 225 * 1000 * 9.80665 * 150e-6 * 150e-6 / (128 * pi * pi * std::pow(0.08, 5));
  CHECK(j["parameters"]["yield_stress"]["value"].get<double>() == doctest::Approx(expected).epsilon(1e-9));
}

TEST_CASE("fit: readings that never move end with exit 3 and no numbers") {
  TempDir dir;
  dir.write("still.csv", "time [s],radius [cm]\n5,3.0\n10,3.0\n20,3.0\n40,3.0\n60,3.0\n90,3.0\n");
  const auto test = dir.write("still.toml", std::string("[sample]\nid = \"LT9-0004\"\ndensity = \"1 g/mL\"\n\n") +
                                                plate_rig +
                                                "\n[readings]\nfile = \"still.csv\"\nresolution = \"1 mm\"\n\n"
                                                "[fit]\nmodel = \"newtonian\"\n");
  const auto json_file = dir.path() / "still.json";
  const Run run = run_spreadfit(dir, "fit " + quoted(test.string()) + " --json " + quoted(json_file.string()));
  INFO(run.out << run.err);
  CHECK(run.exit_code == 3);
  CHECK(run.out.find("NO RESULT") != std::string::npos);
  const auto j = nlohmann::json::parse(read_text(json_file));
  CHECK(j["parameters"].empty());
  CHECK(j["fit"]["converged"] == false);
}

TEST_CASE("fit: bad input exits 2 naming the field") {
  TempDir dir;
  const auto test = plate_test(dir, "LT9-0005",
                               "--model newtonian --set viscosity=20 --set time_origin=0", "");
  SUBCASE("unknown model with a suggestion") {
    const Run run = run_spreadfit(dir, "fit " + quoted(test.string()) + " --model bingam");
    CHECK(run.exit_code == 2);
    CHECK(run.err.find("did you mean 'bingham'") != std::string::npos);
  }
  SUBCASE("a missing test file") {
    const Run run = run_spreadfit(dir, "fit " + quoted((dir.path() / "nope.toml").string()));
    CHECK(run.exit_code == 2);
    CHECK(run.err.find("nope.toml") != std::string::npos);
    // One problem, one line (DEVELOPERS.md, "Errors"): no closing line after it.
    CHECK(std::count(run.err.begin(), run.err.end(), '\n') == 1);
  }
  SUBCASE("one bad file among several: every bad one named, nothing fitted, no output file (README)") {
    const auto json_file = dir.path() / "both.json";
    const auto out_dir = dir.path() / "out";
    std::filesystem::create_directory(out_dir);
    const auto empty = dir.write("empty.toml", "[sample]\nid = \"E\"\ndensity = \"1 g/mL\"\n" + std::string(plate_rig));
    const Run run = run_spreadfit(dir, "fit " + quoted((dir.path() / "nope.toml").string()) + " " +
                                           quoted(test.string()) + " " + quoted(empty.string()) + " --json " +
                                           quoted(json_file.string()) + " --out-dir " + quoted(out_dir.string()));
    CHECK(run.exit_code == 2);
    CHECK(run.err.find("nope.toml") != std::string::npos);
    CHECK(run.err.find("empty.toml") != std::string::npos);
    // Several problems: one line each, then one closing line that counts them.
    CHECK(run.err.find("2 problems above; nothing fitted and no output file written") != std::string::npos);
    CHECK(std::count(run.err.begin(), run.err.end(), '\n') == 3);
    CHECK(run.out.empty());
    CHECK_FALSE(std::filesystem::exists(json_file));
    CHECK(std::filesystem::is_empty(out_dir));
  }
  SUBCASE("--plot and --db write a report and a history row") {
    const auto svg = dir.path() / "p.svg";
    const auto db = dir.path() / "h.db";
    const Run run = run_spreadfit(dir, "fit " + quoted(test.string()) + " --plot " + quoted(svg.string()) +
                                           " --db " + quoted(db.string()));
    INFO(run.out << run.err);
    CHECK(run.exit_code == 0);
    const std::string text = read_text(svg);
    CHECK(text.find("<svg") != std::string::npos);
    CHECK(text.find("</svg>") != std::string::npos);
    CHECK(text.find("LT9-0005") != std::string::npos);
    CHECK(run.out.find("history: added LT9-0005") != std::string::npos);
    const Run again = run_spreadfit(dir, "fit " + quoted(test.string()) + " --db " + quoted(db.string()));
    CHECK(again.out.find("history: replaced LT9-0005") != std::string::npos);
    const Run listing = run_spreadfit(dir, "history " + quoted(db.string()));
    CHECK(listing.exit_code == 0);
    CHECK(listing.out.find("LT9-0005") != std::string::npos);
  }
}

TEST_CASE("fit: product limits come from a spec catalogue beside the test, inline [spec] overrides them") {
  TempDir dir;
  const auto test = plate_test(dir, "LT9-0006",
                               "--model bingham --set yield_stress=20 --set viscosity=5 --set time_origin=0",
                               "[fit]\nmodel = \"bingham\"\n");
  SUBCASE("specs.toml beside the test") {
    dir.write("specs.toml", "[LT9]\nyield_stress = [\"25 Pa\", \"40 Pa\"]\n");
    const auto json_file = dir.path() / "r.json";
    const Run run = run_spreadfit(dir, "fit " + quoted(test.string()) + " --json " + quoted(json_file.string()));
    INFO(run.out << run.err);
    CHECK(run.exit_code == 1);
    CHECK(nlohmann::json::parse(read_text(json_file))["verdict"]["status"] == "fail");
  }
  SUBCASE("--specs names the catalogue; a typo in it is bad input") {
    const auto catalogue = dir.write("cat/limits.toml", "[LT9]\nyield_stres = [\"15 Pa\", \"25 Pa\"]\n");
    const Run run = run_spreadfit(dir, "fit " + quoted(test.string()) + " --specs " + quoted(catalogue.string()));
    CHECK(run.exit_code == 2);
    CHECK(run.err.find("did you mean 'yield_stress'") != std::string::npos);
    CHECK(run.err.find("limits.toml:2") != std::string::npos);
  }
  SUBCASE("a CSV summary for spreadsheets") {
    dir.write("specs.toml", "[LT9]\nyield_stress = [\"15 Pa\", \"25 Pa\"]\n");
    const auto csv = dir.path() / "summary.csv";
    const Run run = run_spreadfit(dir, "fit " + quoted(test.string()) + " --csv " + quoted(csv.string()));
    INFO(run.out << run.err);
    CHECK(run.exit_code == 0);
    const std::string text = read_text(csv);
    CHECK(text.rfind("sample,product,rig,model,status,yield_stress [Pa]", 0) == 0);
    CHECK(text.find("\nLT9-0006,LT9,plate,bingham,ok,") != std::string::npos);
    CHECK(text.find(",pass,") != std::string::npos);
  }
}

TEST_CASE("predict: a fitted plate material on a channel, CSV with a band") {
  TempDir dir;
  const auto test = plate_test(dir, "LT9-0007",
                               "--model bingham --set yield_stress=20 --set viscosity=5 --set time_origin=0",
                               "[fit]\nmodel = \"bingham\"\n");
  const auto json_file = dir.path() / "r.json";
  REQUIRE(run_spreadfit(dir, "fit " + quoted(test.string()) + " --json " + quoted(json_file.string())).exit_code == 0);
  const auto channel = dir.write("channel.toml",
                                 "[sample]\nid = \"C\"\ndensity = \"1 g/mL\"\n[rig]\nkind = \"channel\"\n"
                                 "width = \"5 cm\"\nreservoir_length = \"5 cm\"\nvolume = \"100 mL\"\n");
  const Run run = run_spreadfit(dir, "predict " + quoted(json_file.string()) + " --rig " +
                                         quoted(channel.string()) + " --times 10,30 --samples 50");
  INFO(run.out << run.err);
  REQUIRE(run.exit_code == 0);
  CHECK(run.out.rfind("time [s],front [m],front low [m],front high [m]\n", 0) == 0);
  std::istringstream lines(run.out);
  std::string line;
  std::getline(lines, line);
  int rows = 0;
  while (std::getline(lines, line)) {
    double t, v, lo, hi;
    char c;
    std::istringstream row(line);
    REQUIRE(bool(row >> t >> c >> v >> c >> lo >> c >> hi));
    CHECK(lo <= v);
    CHECK(v <= hi);
    ++rows;
  }
  CHECK(rows == 2);
  SUBCASE("a failed result cannot be predicted from") {
    const auto bad = dir.write("bad.json", "{\"model\": null}");
    const Run r = run_spreadfit(dir, "predict " + quoted(bad.string()) + " --rig " + quoted(channel.string()));
    CHECK(r.exit_code == 2);
    CHECK(r.err.find("bad.json") != std::string::npos);
  }
}

TEST_CASE("predict --plot: the channel readings of the true material lie in the plotted band") {
  // The issue's check through the report: readings the forward model gives on the channel for the material that
  // made the plate readings (the truth, not the fit) are drawn as measured points, and the plot counts them
  // inside the 95% band. The band is the fit's uncertainty propagated by sampling (src/fit/prediction_band.hpp).
  TempDir dir;
  const std::string truth = "--model bingham --set yield_stress=20 --set viscosity=5";
  const auto test = plate_test(dir, "LT9-0011", truth + " --set time_origin=0", "[fit]\nmodel = \"bingham\"\n");
  const auto json_file = dir.path() / "r.json";
  REQUIRE(run_spreadfit(dir, "fit " + quoted(test.string()) + " --json " + quoted(json_file.string())).exit_code == 0);
  const std::string channel_head = "[sample]\nid = \"C\"\ndensity = \"1 g/mL\"\n[rig]\nkind = \"channel\"\n"
                                   "width = \"5 cm\"\nreservoir_length = \"5 cm\"\nvolume = \"100 mL\"\n";
  const auto bare = dir.write("channel-rig.toml", channel_head);
  const Run sim = run_spreadfit(dir, "simulate " + quoted(bare.string()) + " " + truth + " --times 5,10,20,30,45,60");
  REQUIRE(sim.exit_code == 0);
  dir.write("channel.csv", sim.out);
  const auto channel =
      dir.write("channel.toml", channel_head + "[readings]\nfile = \"channel.csv\"\nresolution = \"0.5 mm\"\n");
  const auto plot = dir.path() / "prediction.svg";
  const Run run = run_spreadfit(dir, "predict " + quoted(json_file.string()) + " --rig " + quoted(channel.string()) +
                                         " --times 10,30 --plot " + quoted(plot.string()));
  INFO(run.out << run.err);
  REQUIRE(run.exit_code == 0);
  const std::string svg = read_text(plot);
  const spreadfit::svg_test::XmlReader xml(svg);
  CHECK(spreadfit::svg_test::with_class(xml, "measured").size() == 6);
  CHECK(spreadfit::svg_test::with_class(xml, "predicted").size() == 2);
  CHECK(spreadfit::svg_test::with_class(xml, "band").size() == 1);
  CHECK(svg.find("6 of 6 within the band") != std::string::npos);
  CHECK(svg.find("nan") == std::string::npos);
  {
    // The header's "95% of draws" range of each parameter is the 2.5-97.5% range of the draws stored in the
    // result (the draws the band is solved from), so it stays inside the fit's box: definition of the statement,
    // with the order-statistic index rounded outward as for the band (fit::central_95_range).
    const auto result = nlohmann::json::parse(read_text(json_file));
    const auto& log_space = result.at("fit").at("log_space");
    const auto& draws = log_space.at("draws");
    REQUIRE(draws.size() > 10);
    const std::size_t parameter = 0;  // yield_stress, the first material parameter of the layout
    REQUIRE(log_space.at("parameters").at(parameter) == "yield_stress");
    std::vector<double> values;
    for (const auto& d : draws) values.push_back(d.at(parameter).get<double>());
    std::sort(values.begin(), values.end());
    const double last = double(values.size() - 1);
    const double low = values[std::size_t(std::floor(0.025 * last))], high = values[std::size_t(std::ceil(0.975 * last))];
    const std::string stated = fmt::format("yield stress {:.4g} Pa (95% of draws: {:.3g} to {:.3g})",
                                           std::exp(log_space.at("estimate").at(parameter).get<double>()),
                                           std::exp(low), std::exp(high));
    INFO(stated);
    CHECK(svg.find(stated) != std::string::npos);
  }
  spreadfit::svg_test::check_renders(svg, 900, "prediction");
  SUBCASE("an unwritable plot path is bad input and leaves no CSV") {
    const Run bad = run_spreadfit(dir, "predict " + quoted(json_file.string()) + " --rig " +
                                           quoted(channel.string()) + " --plot " +
                                           quoted((dir.path() / "missing" / "p.svg").string()));
    CHECK(bad.exit_code == 2);
    CHECK(bad.out.empty());
    CHECK(bad.err.find("p.svg") != std::string::npos);
  }
}

TEST_CASE("fit: limits at a reference temperature judge Arrhenius-shifted values") {
  // Viscosity measured at 30 degC, limits set at 20 degC with E_a = 60 kJ/mol: the value is taken to 20 degC by
  // exp(E_a/R (1/293.15 - 1/303.15)) = 2.25 (Arrhenius law, models/temperature.hpp) before it is judged.
  TempDir dir;
  const auto test = plate_test(dir, "LT9-0008", "--model newtonian --set viscosity=10 --set time_origin=0",
                               "[fit]\nmodel = \"newtonian\"\n");
  std::string text = read_text(test);
  const auto at = text.find("density = ");
  text.insert(at, "temperature = \"30 degC\"\n");
  dir.write("LT9-0008.toml", text);
  dir.write("specs.toml",
            "[LT9]\nviscosity = [\"15 Pa.s\", \"30 Pa.s\"]\nreference_temperature = \"20 degC\"\n"
            "activation_energy = \"60 kJ/mol\"\n");
  const auto json_file = dir.path() / "r.json";
  const Run run = run_spreadfit(dir, "fit " + quoted(test.string()) + " --json " + quoted(json_file.string()));
  INFO(run.out << run.err);
  const auto j = nlohmann::json::parse(read_text(json_file));
  const double measured = j["parameters"]["viscosity"]["value"].get<double>();
  const double shifted = j["at_reference_temperature"]["parameters"]["viscosity"]["value"].get<double>();
  const double factor = std::exp(60e3 / 8.314462618 * (1 / 293.15 - 1 / 303.15));
  CHECK(measured == doctest::Approx(10).epsilon(0.02));
  CHECK(shifted == doctest::Approx(measured * factor).epsilon(1e-9));
  CHECK(j["at_reference_temperature"]["temperature_K"].get<double>() == doctest::Approx(293.15));
  // 10 Pa.s at 30 degC is out of [15, 30] as measured but about 22.5 Pa.s at 20 degC: in spec.
  CHECK(run.exit_code == 0);
  CHECK(j["verdict"]["status"] == "pass");
  SUBCASE("an activation energy without a reference temperature is bad input") {
    dir.write("specs.toml", "[LT9]\nactivation_energy = \"60 kJ/mol\"\n");
    const Run bad = run_spreadfit(dir, "fit " + quoted(test.string()));
    CHECK(bad.exit_code == 2);
    CHECK(bad.err.find("reference_temperature") != std::string::npos);
  }
}

TEST_CASE("plan: a larger fill on the plate determines a Bingham viscosity better, and the plan says which") {
  // With the same ring, 150 mL spreads further and longer than 60 mL, so its readings carry more of the viscosity
  // (expected-interval ranking from the Fisher information, src/fit/expected_intervals.hpp).
  TempDir dir;
  const std::string head = "[sample]\nid = \"P\"\ndensity = \"1 g/mL\"\n[rig]\nkind = \"plate\"\nring_radius = \"3 cm\"\n";
  const auto small = dir.write("small.toml", head + "volume = \"60 mL\"\n[readings]\nresolution = \"0.5 mm\"\n");
  const auto large = dir.write("large.toml", head + "volume = \"150 mL\"\n[readings]\nresolution = \"0.5 mm\"\n");
  const Run run = run_spreadfit(dir, "plan " + quoted(small.string()) + " " + quoted(large.string()) +
                                         " --model bingham --set yield_stress=20 --set viscosity=5 --until 180");
  INFO(run.out << run.err);
  REQUIRE(run.exit_code == 0);
  CHECK(run.out.find("recommended: large.toml") != std::string::npos);
  CHECK(run.out.find("yield_stress") != std::string::npos);
}

TEST_CASE("fit with a flow-index prior: the reported fit carries its likelihood draws whichever way the prior went") {
  // predict's band and the report's band are drawn from the result's likelihood draws (README, "Result JSON"), so
  // a converged result with profile intervals has them: when the prior entered the fit, and when the law has no
  // flow index for it to act on (the fit without it is reported; so too when the readings contradict the prior,
  // fit::with_likelihood_draws, tested in tests/fit/test_prediction_band.cpp).
  TempDir dir;
  const auto test = plate_test(dir, "LT9-0007",
                               "--model herschel-bulkley --set yield_stress=12 --set consistency=6 --set flow_index=0.45 "
                               "--set time_origin=0",
                               "");
  struct Case {
    std::string what, model, prior;
    bool applied;
  };
  for (const Case& c : {Case{"prior applied", "herschel-bulkley", "[0.45, 0.05]", true},
                        Case{"law without a flow index", "bingham", "[0.45, 0.05]", false}}) {
    INFO(c.what);
    const auto specs = dir.write("specs.toml", "[LT9]\nflow_index_prior = " + c.prior + "\n");
    const auto json_file = dir.path() / "out.json";
    const Run run = run_spreadfit(dir, "fit " + quoted(test.string()) + " --model " + c.model + " --specs " +
                                           quoted(specs.string()) + " --json " + quoted(json_file.string()));
    INFO(run.out << run.err);
    REQUIRE(run.exit_code == 0);
    const auto j = nlohmann::json::parse(read_text(json_file));
    REQUIRE(j["fit"]["converged"] == true);
    CHECK(j["fit"].contains("prior") == c.applied);
    REQUIRE(j["fit"]["log_space"].contains("draws"));
    CHECK(j["fit"]["log_space"]["draws"].size() == 200);  // FitOptions::likelihood_draws
    CHECK(j["fit"]["log_space"]["draws"][0].size() == j["fit"]["log_space"]["parameters"].size());
  }
}
