// The null and calibrate commands end to end on the bundled demo: JSON keys, units, files.
#include <catch2/catch.hpp>

#include <sys/wait.h>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>

#include <nlohmann/json.hpp>

namespace {

// Runs a command line, returning its exit status and standard output.
std::pair<int, std::string> run(const std::string& cmd) {
  std::string out;
  FILE* p = popen(cmd.c_str(), "r");
  if (!p) return {-1, out};
  char buf[4096];
  while (std::size_t n = std::fread(buf, 1, sizeof buf, p)) out.append(buf, n);
  const int status = pclose(p);
  return {WIFEXITED(status) ? WEXITSTATUS(status) : -1, out};
}

std::filesystem::path scratch(const std::string& name) {
  const auto dir = std::filesystem::temp_directory_path() / ("coilwright-test-" + name);
  std::filesystem::remove_all(dir);
  std::filesystem::create_directories(dir);
  return dir;
}

}  // namespace

TEST_CASE("cli null: --json prints the documented keys and writes the design and the residual map", "[cli][nulling]") {
  const auto dir = scratch("null");
  const std::string src = COILWRIGHT_SOURCE_DIR;
  const auto [rc, out] = run(std::string(COILWRIGHT_BINARY) + " -q null " + src + "/configs/cage-null.toml --survey " + src +
                             "/configs/survey-demo.csv --json --out-dir " + dir.string());
  REQUIRE(rc == 0);
  const auto j = nlohmann::json::parse(out);
  REQUIRE(j.at("ambient").at("uniform").size() == 3);
  REQUIRE(j.at("ambient").at("gradient").size() == 3);
  // The demo's uniform field (tests/reference/nulling/make_survey_demo.py): Bx = 18.6 uT, in T;
  // fitted from 3 nT noise, so within 4 nT.
  CHECK(std::abs(j["ambient"]["uniform"][0].get<double>() - 18.6e-6) < 4e-9);
  // Gradient row 1 = dBy/d(x, y, z); dBy/dy = -250 nT/m in the demo, fitted within +-6 nT/m (1 sigma),
  // so within 30 nT/m.
  CHECK(std::abs(j["ambient"]["gradient"][1][1].get<double>() + 250e-9) < 30e-9);
  CHECK(j.at("currents").contains("x-pair"));
  CHECK(j.at("currents").size() == 3);
  CHECK(j.at("residual_worst").get<double>() < 100e-9);  // the cage's stated tolerance
  CHECK(j.at("residual_rms").get<double>() < j.at("residual_worst").get<double>());
  CHECK(std::filesystem::exists(dir / "cage-null-null.toml"));
  CHECK(std::filesystem::exists(dir / "cage-null-null.csv"));
  // The written design reloads.
  const auto [rc2, out2] = run(std::string(COILWRIGHT_BINARY) + " field " + (dir / "cage-null-null.toml").string());
  CHECK(rc2 == 0);
}

TEST_CASE("cli null: too few readings exit with the bad-input code", "[cli][nulling]") {
  const auto dir = scratch("null-few");
  {
    std::ofstream f(dir / "few.csv");
    f << "x,y,z,Bx[uT],By[uT],Bz[uT]\n0,0,0,18,-2,-44\n0.1,0,0,18,-2,-44\n";
  }
  const std::string src = COILWRIGHT_SOURCE_DIR;
  const auto [rc, out] = run(std::string(COILWRIGHT_BINARY) + " null " + src + "/configs/cage-null.toml --survey " +
                             (dir / "few.csv").string() + " --out-dir " + dir.string() + " 2>&1");
  CHECK(rc == 2);
  CHECK_THAT(out, Catch::Contains("2 reading(s)") && Catch::Contains("at least 3 readings"));
}
