// Escaping round trip: user strings (project, coil and circuit names) that hold quotes, commas,
// newlines, backslashes and markup go through a real `design` run and come back unchanged from
// every file it writes. Each format is checked against its own rules:
//   design-NN.toml  the TOML 1.0 spec (basic strings: \" \\ \n \t \uXXXX escapes), read back by
//                   our config reader;
//   designs.csv     RFC 4180 (fields with a comma, quote or line break in double quotes, a quote
//                   doubled), read by a small parser of that grammar below and by Python's csv
//                   module (/usr/bin/python3);
//   report.html     the HTML standard: in text and attribute values, & < > " ' as character
//                   references, so no name can open a tag;
//   summary.json    RFC 8259, read by nlohmann::json.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <sys/wait.h>
#include <unistd.h>

#include <nlohmann/json.hpp>

#include "coilwright/config.hpp"
#include "coilwright/report.hpp"
#include "coilwright/results.hpp"

namespace {
namespace fs = std::filesystem;

// The names, as the strings the config's TOML escapes stand for.
const std::string kProject = "rig \"A\", <script>alert(1)</script>\nsecond line";
const std::string kCircuit = "main, \"hot\" <script>alert(1)</script>";
const std::string kCoil = "pair\n\"outer\", <script>alert(1)</script> \\ end";

// TOML basic-string escapes for the config we write (TOML 1.0, "String").
std::string toml_basic(const std::string& s) {
  std::string out = "\"";
  for (char c : s) {
    if (c == '"') out += "\\\"";
    else if (c == '\\') out += "\\\\";
    else if (c == '\n') out += "\\n";
    else out += c;
  }
  return out + "\"";
}

std::string config_text() {
  return "[project]\nname = " + toml_basic(kProject) +
         "\n"
         "[[circuit]]\nname = " + toml_basic(kCircuit) +
         "\ncurrent = { min = \"-5 A\", max = \"5 A\" }\n"
         "[[coil]]\nname = " + toml_basic(kCoil) +
         "\nshape = \"loop\"\ncircuit = " + toml_basic(kCircuit) +
         "\n"
         "centre = [\"0 m\", \"0 m\", \"0 m\"]\naxis = [0, 0, 1]\nturns = 10\nradius = \"100 mm\"\n"
         "separation = { start = \"100 mm\", min = \"80 mm\", max = \"120 mm\" }\n"
         "[target]\nregion = \"sphere\"\ncentre = [\"0 m\", \"0 m\", \"0 m\"]\nradius = \"10 mm\"\ngoal = \"uniform\"\n"
         "field = [\"0 T\", \"0 T\", \"100 uT\"]\ntolerance = \"1 %\"\n"
         "[search]\nseed = 1\nstarts = 2\nmax_evaluations = 40\ndesigns = 2\n";
}

std::string read_text(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

// RFC 4180 section 2: records of fields separated by commas and ended by CRLF (we also take a
// bare LF); a field in double quotes may hold commas, CR, LF, and "" for one quote.
std::vector<std::vector<std::string>> parse_rfc4180(const std::string& text) {
  std::vector<std::vector<std::string>> rows(1);
  std::string field;
  bool quoted = false, was_quoted = false;
  for (std::size_t i = 0; i < text.size(); ++i) {
    const char c = text[i];
    if (quoted) {
      if (c == '"' && i + 1 < text.size() && text[i + 1] == '"') {
        field += '"';
        ++i;
      } else if (c == '"') {
        quoted = false;
      } else {
        field += c;
      }
    } else if (c == '"') {
      REQUIRE(field.empty());  // a quote may only open a field
      quoted = was_quoted = true;
    } else if (c == ',') {
      rows.back().push_back(field);
      field.clear();
      was_quoted = false;
    } else if (c == '\n' || (c == '\r' && i + 1 < text.size() && text[i + 1] == '\n')) {
      if (c == '\r') ++i;
      rows.back().push_back(field);
      field.clear();
      was_quoted = false;
      rows.emplace_back();
    } else {
      REQUIRE(!was_quoted);  // nothing may follow the closing quote but a separator
      field += c;
    }
  }
  REQUIRE(!quoted);
  if (!field.empty() || !rows.back().empty()) rows.back().push_back(field);
  if (rows.back().empty()) rows.pop_back();
  return rows;
}

}  // namespace

TEST_CASE("escaping: names with quotes, commas, newlines and markup survive every output", "[escaping][cli]") {
  const fs::path dir = fs::temp_directory_path() / ("coilwright-escaping-" + std::to_string(getpid()));
  fs::remove_all(dir);
  fs::create_directories(dir);
  const fs::path config = dir / "names.toml";
  std::ofstream(config, std::ios::binary) << config_text();
  const fs::path out = dir / "out";
  const std::string cmd = std::string("\"") + COILWRIGHT_BINARY + "\" -q design \"" + config.string() + "\" --out \"" +
                          out.string() + "\" > \"" + (dir / "stdout.txt").string() + "\" 2>&1";
  const int status = std::system(cmd.c_str());
  INFO(read_text(dir / "stdout.txt"));
  REQUIRE(WIFEXITED(status));
  REQUIRE(WEXITSTATUS(status) == 0);

  // The config reader itself takes the escapes as the TOML spec says.
  const coilwright::Model original = coilwright::load_model(config);
  REQUIRE(original.project.name == kProject);
  REQUIRE(original.coils.at(0).name == kCoil);
  REQUIRE(original.circuits.at(0).name == kCircuit);

  {  // design-NN.toml reads back with the same names
    int files = 0;
    for (int rank = 1; fs::exists(out / coilwright::design_file_name(static_cast<std::size_t>(rank))); ++rank) {
      INFO(coilwright::design_file_name(static_cast<std::size_t>(rank)));
      const coilwright::Model m = coilwright::load_model(out / coilwright::design_file_name(static_cast<std::size_t>(rank)));
      CHECK(m.project.name == kProject);
      REQUIRE(m.coils.size() == 1);
      CHECK(m.coils[0].name == kCoil);
      CHECK(m.coils[0].circuit == kCircuit);
      REQUIRE(m.circuits.size() == 1);
      CHECK(m.circuits[0].name == kCircuit);
      ++files;
    }
    CHECK(files >= 1);
  }

  {  // designs.csv parses by RFC 4180 with the names in its header
    const auto rows = parse_rfc4180(read_text(out / "designs.csv"));
    REQUIRE(rows.size() >= 2);
    const auto& header = rows[0];
    for (const auto& r : rows) CHECK(r.size() == header.size());
    CHECK(std::find(header.begin(), header.end(), kCircuit + ".current") != header.end());
    const auto label = std::find_if(header.begin(), header.end(), [](const std::string& h) { return h.rfind(kCoil, 0) == 0; });
    CHECK(label != header.end());
  }

  {  // designs.csv parses with Python's csv module
    // The script prints the header cells as JSON, so the comparison is exact.
    const fs::path script = dir / "read.py";
    std::ofstream(script) << "import csv, json, sys\n"
                             "with open(sys.argv[1], newline='') as f:\n"
                             "    rows = list(csv.reader(f, strict=True))\n"
                             "assert len({len(r) for r in rows}) == 1, 'ragged rows'\n"
                             "print(json.dumps(rows[0]))\n";
    const std::string py = "/usr/bin/python3 \"" + script.string() + "\" \"" + (out / "designs.csv").string() + "\" > \"" +
                           (dir / "header.json").string() + "\"";
    const int rc = std::system(py.c_str());
    REQUIRE(WIFEXITED(rc));
    REQUIRE(WEXITSTATUS(rc) == 0);
    const auto header = nlohmann::json::parse(read_text(dir / "header.json")).get<std::vector<std::string>>();
    CHECK(std::find(header.begin(), header.end(), kCircuit + ".current") != header.end());
  }

  {  // report.html holds the names as text, never as markup
    const std::string page = read_text(out / "report.html");
    REQUIRE(!page.empty());
    CHECK(page.find("<script>alert(1)</script>") == std::string::npos);
    CHECK(page.find("<script") == std::string::npos);  // the page itself needs no script
    CHECK(page.find(coilwright::html_escape(kProject)) != std::string::npos);
    CHECK(page.find("&lt;script&gt;alert(1)&lt;/script&gt;") != std::string::npos);
    CHECK(page.find(coilwright::html_escape(kCircuit)) != std::string::npos);
  }

  {  // summary.json holds the names exactly
    const auto j = nlohmann::json::parse(read_text(out / "summary.json"));
    CHECK(j.at("project").get<std::string>() == kProject);
    const auto& d = j.at("designs").at(0);
    CHECK(d.at("currents").contains(kCircuit));
    bool found = false;
    for (const auto& [key, value] : d.at("parameters").items()) found = found || key.rfind(kCoil, 0) == 0;
    CHECK(found);
  }
  fs::remove_all(dir);
}
