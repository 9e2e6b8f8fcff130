// Publishing a results folder as one unit: our files are replaced together, the user's files
// stay, a failed write leaves the previous folder exactly as it was, and scratch folders of
// killed runs are cleared. Common practice (write aside, then rename), no source.
#include <catch2/catch.hpp>

#include <fstream>
#include <iterator>
#include <map>
#include <stdexcept>
#include <string>

#include <unistd.h>

#include "coilwright/error.hpp"
#include "coilwright/result_folder.hpp"
#include "coilwright/results.hpp"

using namespace coilwright;
namespace fs = std::filesystem;

namespace {

struct TempDir {
  fs::path path;
  TempDir() {
    std::string tmpl = (fs::temp_directory_path() / "coilwright-folder-XXXXXX").string();
    REQUIRE(::mkdtemp(tmpl.data()) != nullptr);
    path = tmpl;
  }
  ~TempDir() {
    std::error_code ec;
    fs::remove_all(path, ec);
  }
};

void put(const fs::path& file, const std::string& text) {
  fs::create_directories(file.parent_path());
  std::ofstream(file, std::ios::binary) << text;
}

std::string get(const fs::path& file) {
  std::ifstream in(file, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

// Every file under `dir` (relative path -> content).
std::map<std::string, std::string> snapshot(const fs::path& dir) {
  std::map<std::string, std::string> out;
  for (const auto& e : fs::recursive_directory_iterator(dir))
    if (e.is_regular_file()) out[fs::relative(e.path(), dir).string()] = get(e.path());
  return out;
}

}  // namespace

TEST_CASE("Our result names are recognised and nothing else is") {
  for (const char* ours : {"designs.csv", "summary.json", "report.html", "figures", "design-01.toml", "design-12-schedule.txt",
                           "design-03-axis.csv", "design-03-xz.vtk", "design-100.toml"})
    CHECK(is_result_name(ours));
  for (const char* theirs : {"notes.txt", "design-1.toml", "design-01.txt", "design-01-.csv", "design-01-axis.png", "designs.csv~",
                             "Design-01.toml", "summary.json.bak", "figures2", ""})
    CHECK_FALSE(is_result_name(theirs));
}

TEST_CASE("A project name becomes a folder name that stays inside its parent") {
  CHECK(safe_folder_name("sensor-calibration-rig") == "sensor-calibration-rig");
  CHECK(safe_folder_name("../../etc") == "-..-etc");
  CHECK(safe_folder_name("..") == "unnamed");
  CHECK(safe_folder_name("") == "unnamed");
  CHECK(safe_folder_name("rig <b>\"1\"/2") == "rig--b--1--2");
  CHECK(safe_folder_name(".hidden") == "hidden");
  CHECK(safe_folder_name("Spule \xC3\xA4") == "Spule---");  // non-ASCII bytes are replaced one by one
}

TEST_CASE("Publishing replaces our files as a set and keeps the user's") {
  TempDir t;
  const fs::path dir = t.path / "results";
  publish_folder(dir, [](const fs::path& d) {
    put(d / "summary.json", "old summary");
    put(d / "design-01.toml", "old 1");
    put(d / "design-02.toml", "old 2");
    put(d / "figures" / "a.svg", "old figure");
  }, is_result_name);
  put(dir / "notes.txt", "the user's notes");
  put(dir / "measurements" / "run1.csv", "x,y\n1,2\n");

  publish_folder(dir, [](const fs::path& d) {
    put(d / "summary.json", "new summary");
    put(d / "design-01.toml", "new 1");
    put(d / "figures" / "b.svg", "new figure");
  }, is_result_name);
  const auto now = snapshot(dir);
  const std::map<std::string, std::string> expected{{"summary.json", "new summary"},
                                                    {"design-01.toml", "new 1"},
                                                    {"figures/b.svg", "new figure"},
                                                    {"notes.txt", "the user's notes"},
                                                    {"measurements/run1.csv", "x,y\n1,2\n"}};
  CHECK(now == expected);  // design-02.toml and figures/a.svg of the previous run are gone
  // No scratch folder is left beside it.
  for (const auto& e : fs::directory_iterator(t.path)) CHECK(e.path().filename() == "results");
}

TEST_CASE("A failed write leaves the previous results exactly as they were") {
  TempDir t;
  const fs::path dir = t.path / "results";
  publish_folder(dir, [](const fs::path& d) { put(d / "summary.json", "old"); }, is_result_name);
  put(dir / "notes.txt", "mine");
  const auto before = snapshot(dir);
  CHECK_THROWS_AS(publish_folder(dir, [](const fs::path& d) {
    put(d / "summary.json", "half");
    throw OutputError("disk full (simulated)");
  }, is_result_name), OutputError);
  CHECK(snapshot(dir) == before);
  for (const auto& e : fs::directory_iterator(t.path)) CHECK(e.path().filename() == "results");
}

TEST_CASE("Scratch folders of killed runs are cleared; those of live runs are not") {
  TempDir t;
  const fs::path dir = t.path / "results";
  // A pid that cannot be running (above the kernel's pid_max of 4194304).
  put(t.path / ".results.staging-999999999" / "design-01.toml", "half-written");
  put(t.path / ".results.previous-999999998" / "summary.json", "previous");
  const fs::path live = t.path / (".results.staging-" + std::to_string(::getppid()));
  put(live / "summary.json", "someone else's run");
  put(t.path / ".other.staging-999999999" / "x", "not for this folder");
  publish_folder(dir, [](const fs::path& d) { put(d / "summary.json", "new"); }, is_result_name);
  CHECK_FALSE(fs::exists(t.path / ".results.staging-999999999"));
  CHECK_FALSE(fs::exists(t.path / ".results.previous-999999998"));
  CHECK(fs::exists(live));
  CHECK(fs::exists(t.path / ".other.staging-999999999"));
}

TEST_CASE("A folder that cannot be written is a clear output error") {
  TempDir t;
  put(t.path / "plain-file", "x");
  const auto write = [](const fs::path& d) { put(d / "summary.json", "new"); };
  try {
    publish_folder(t.path / "plain-file", write, is_result_name);
    FAIL("accepted");
  } catch (const OutputError& e) {
    CHECK_THAT(e.what(), Catch::Contains("plain-file") && Catch::Contains("it exists and is not a folder"));
  }
  // Writable for nobody, root included: the process file system.
  CHECK_THROWS_WITH(publish_folder("/proc/coilwright-results/run", write, is_result_name),
                    Catch::Contains("cannot write the results folder '/proc/coilwright-results/run'"));
}
