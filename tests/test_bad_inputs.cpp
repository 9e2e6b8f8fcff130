// The bad-input corpus: every folder in tests/bad_inputs/ is one mistake a user can make with a
// command (its config, point list, survey, readings, results folder or command line), and the
// message the tool must give for it. Common practice, no source, for the message format
// `<file>:<line>:<column>: key '<key>': <what was found>; accepted: <what is accepted>`.
//
// A case folder holds
//   cmd       the arguments after the program name, one per line; {dir} is the case folder,
//             {common} is tests/bad_inputs/_common, {tmp} a fresh empty folder for outputs and
//             generated inputs;
//   expect    `exit <code>`, then lines that must each equal a whole line of stderr (after the
//             same substitutions); optionally `max_rss_mb <n>`, a bound on the run's peak
//             memory; lines starting with '#' say where the expectation comes from;
//   generate  (optional) `<file> <rows> <header> <row>`: writes {tmp}/<file> with the header
//             and <rows> copies of the row before the run (large inputs are never committed);
//   and the input files themselves.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <fcntl.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>

#include "coilwright/calibration.hpp"
#include "coilwright/config.hpp"
#include "coilwright/csv.hpp"
#include "coilwright/error.hpp"
#include "coilwright/survey.hpp"
#include "coilwright/text_lines.hpp"

namespace {
namespace fs = std::filesystem;

const fs::path kCorpus = fs::path(COILWRIGHT_SOURCE_DIR) / "tests" / "bad_inputs";

std::string read_text(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

std::vector<std::string> lines_of(const std::string& text) {
  std::vector<std::string> out;
  std::istringstream in(text);
  std::string line;
  while (std::getline(in, line)) out.push_back(line);
  return out;
}

std::string substitute(std::string s, const fs::path& dir, const fs::path& tmp) {
  const std::pair<std::string, std::string> subs[] = {
      {"{dir}", dir.string()}, {"{common}", (kCorpus / "_common").string()}, {"{tmp}", tmp.string()}};
  for (const auto& [from, to] : subs)
    for (std::size_t pos = s.find(from); pos != std::string::npos; pos = s.find(from, pos + to.size())) s.replace(pos, from.size(), to);
  return s;
}

struct Run {
  int exit_code = -1;
  std::string err;
  long max_rss_kb = 0;
};

// Runs the built binary with `args` (no shell), capturing stderr and the child's peak memory.
Run run_binary(const std::vector<std::string>& args, const fs::path& tmp) {
  const fs::path err_file = tmp / ".stderr";
  std::vector<char*> argv;
  std::string program = COILWRIGHT_BINARY;
  argv.push_back(program.data());
  std::vector<std::string> copy = args;
  for (auto& a : copy) argv.push_back(a.data());
  argv.push_back(nullptr);
  const pid_t pid = fork();
  if (pid == 0) {
    const int null_fd = open("/dev/null", O_WRONLY);
    const int err_fd = open(err_file.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    if (null_fd < 0 || err_fd < 0) _exit(127);
    dup2(null_fd, 1);
    dup2(err_fd, 2);
    if (chdir(tmp.c_str()) != 0) _exit(127);  // default output folders land in {tmp}
    execv(argv[0], argv.data());
    _exit(127);
  }
  Run r;
  int status = 0;
  rusage usage{};
  if (pid > 0 && wait4(pid, &status, 0, &usage) == pid) {
    r.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : 128 + WTERMSIG(status);
    r.max_rss_kb = usage.ru_maxrss;
  }
  r.err = read_text(err_file);
  return r;
}

void generate(const fs::path& spec, const fs::path& tmp) {
  std::istringstream in(read_text(spec));
  std::string file, header, row;
  long rows = 0;
  while (in >> file >> rows >> header >> row) {
    std::FILE* f = std::fopen((tmp / file).c_str(), "wb");
    REQUIRE(f != nullptr);
    std::string block;
    for (int i = 0; i < 4096; ++i) block += row + "\n";
    std::fprintf(f, "%s\n", header.c_str());
    for (long i = 0; i < rows; i += 4096) {
      const long n = std::min<long>(4096, rows - i);
      std::fwrite(block.data(), 1, static_cast<std::size_t>(n) * (row.size() + 1), f);
    }
    std::fclose(f);
  }
}

std::vector<fs::path> corpus_cases() {
  std::vector<fs::path> out;
  for (const auto& e : fs::directory_iterator(kCorpus))
    if (e.is_directory() && e.path().filename().string().front() != '_') out.push_back(e.path());
  std::sort(out.begin(), out.end());
  return out;
}

}  // namespace

TEST_CASE("bad inputs: every case exits with its code and prints its message", "[bad_inputs][cli]") {
  const auto cases = corpus_cases();
  CHECK(cases.size() >= 50);
  for (const auto& dir : cases) {
    const std::string name = dir.filename().string();
    DYNAMIC_SECTION(name) {
      const fs::path tmp = fs::temp_directory_path() / ("coilwright-bad-inputs-" + std::to_string(getpid())) / name;
      fs::remove_all(tmp);
      fs::create_directories(tmp);
      if (fs::exists(dir / "generate")) generate(dir / "generate", tmp);
      std::vector<std::string> args;
      for (const auto& a : lines_of(read_text(dir / "cmd"))) args.push_back(substitute(a, dir, tmp));
      const Run r = run_binary(args, tmp);
      INFO("stderr:\n" << r.err);
      int want_exit = -1;
      long max_rss_mb = 0;
      std::vector<std::string> want_lines;
      for (const auto& line : lines_of(read_text(dir / "expect"))) {
        if (line.empty() || line.front() == '#') continue;
        if (line.rfind("exit ", 0) == 0)
          want_exit = std::stoi(line.substr(5));
        else if (line.rfind("max_rss_mb ", 0) == 0)
          max_rss_mb = std::stol(line.substr(11));
        else
          want_lines.push_back(substitute(line, dir, tmp));
      }
      CHECK(want_exit >= 0);
      CHECK(r.exit_code == want_exit);
      CHECK(!want_lines.empty());
      const auto got = lines_of(r.err);
      for (const auto& want : want_lines) {
        INFO("expected line: " << want);
        CHECK(std::find(got.begin(), got.end(), want) != got.end());
      }
#ifdef COILWRIGHT_SANITIZED
      // Under a sanitizer freed memory waits in quarantine and shadow memory is added: the bound
      // is for ordinary builds (COILWRIGHT_SANITIZED comes from cmake/Sanitizers.cmake).
      max_rss_mb = 0;
#endif
      if (max_rss_mb > 0) {
        INFO("peak memory " << r.max_rss_kb / 1024 << " MB");
        CHECK(r.max_rss_kb / 1024 <= max_rss_mb);
      }
      fs::remove_all(tmp);
      std::error_code ec;
      fs::remove(tmp.parent_path(), ec);  // the per-process folder, once empty
    }
  }
}

// Spreadsheets save CSV with a UTF-8 byte-order mark and CRLF line ends; editors on Windows
// save TOML with CRLF (which TOML 1.0 allows as a newline). Such a file must read exactly like
// the clean one. Common practice, no source.
namespace {
std::string with_bom_crlf(const std::string& clean) {
  std::string out = "\xEF\xBB\xBF";
  for (char c : clean) {
    if (c == '\n') out += '\r';
    out += c;
  }
  return out;
}
}  // namespace

TEST_CASE("bad inputs: a byte-order mark and CRLF line ends read like the clean file", "[bad_inputs][csv]") {
  const std::string points = "# probes\nx,y,z\n0.01,0.02,0.03\n-1e-3, 0 ,+4\n";
  const auto a = coilwright::parse_points_csv(points, "clean.csv");
  const auto b = coilwright::parse_points_csv(with_bom_crlf(points), "bom.csv");
  REQUIRE(a.size() == 2);
  REQUIRE(b.size() == a.size());
  for (std::size_t i = 0; i < a.size(); ++i) CHECK(a[i] == b[i]);  // the same text gives the same bits

  const std::string survey = read_text(kCorpus / "_common" / "survey.csv");
  const auto s1 = coilwright::parse_survey_csv(survey, "clean.csv");
  const auto s2 = coilwright::parse_survey_csv(with_bom_crlf(survey), "bom.csv");
  REQUIRE(s1.size() == 7);
  REQUIRE(s2.size() == s1.size());
  CHECK(s1.lines == s2.lines);
  for (std::size_t i = 0; i < s1.size(); ++i) {
    CHECK(s1.points[i] == s2.points[i]);
    CHECK(s1.field.bx[i] == s2.field.bx[i]);
    CHECK(s1.field.bz[i] == s2.field.bz[i]);
  }

  const std::string readings = "z-pair[A],x-pair[mA],Bx[uT],By[uT],Bz[uT]\n0,0,1,2,3\n1,0,1,2,9\n0,500,4,2,3\n1,500,4,2,9\n";
  const auto c1 = coilwright::parse_calibration_csv(readings, "clean.csv");
  const auto c2 = coilwright::parse_calibration_csv(with_bom_crlf(readings), "bom.csv");
  CHECK(c1.circuits == std::vector<std::string>{"z-pair", "x-pair"});
  CHECK(c2.circuits == c1.circuits);
  CHECK(c1.currents_A == c2.currents_A);
  CHECK(c1.field_T == c2.field_T);

  const std::string rig = read_text(kCorpus / "_common" / "rig.toml");
  const auto m1 = coilwright::parse_model(rig, "clean.toml");
  const auto m2 = coilwright::parse_model(with_bom_crlf(rig), "bom.toml");
  REQUIRE(m2.coils.size() == m1.coils.size());
  CHECK(m2.project.name == m1.project.name);
  CHECK(m2.coils[1].radius_m == m1.coils[1].radius_m);
  CHECK(m2.location_of("coil.x-coils").line == m1.location_of("coil.x-coils").line);
}

TEST_CASE("bad inputs: field --points gives the same bytes for a BOM and CRLF copy", "[bad_inputs][cli]") {
  const fs::path tmp = fs::temp_directory_path() / ("coilwright-bom-" + std::to_string(getpid()));
  fs::create_directories(tmp);
  const std::string points = read_text(kCorpus / "_common" / "points.csv");
  std::ofstream(tmp / "bom.csv", std::ios::binary) << with_bom_crlf(points);
  const std::string rig = (kCorpus / "_common" / "rig.toml").string();
  const Run clean = run_binary({"field", rig, "--points", (kCorpus / "_common" / "points.csv").string(), "--out", (tmp / "a.csv").string()}, tmp);
  const Run bom = run_binary({"field", rig, "--points", (tmp / "bom.csv").string(), "--out", (tmp / "b.csv").string()}, tmp);
  INFO(clean.err << bom.err);
  CHECK(clean.exit_code == 0);
  CHECK(bom.exit_code == 0);
  CHECK(read_text(tmp / "a.csv") == read_text(tmp / "b.csv"));
  CHECK(!read_text(tmp / "a.csv").empty());
  fs::remove_all(tmp);
}

// The line reader under every CSV reader: text rules from RFC 3629 (UTF-8) and common practice.
TEST_CASE("bad inputs: the line reader refuses binary bytes and overlong lines at their column", "[bad_inputs][csv]") {
  const auto error_of = [](const std::string& text) {
    try {
      coilwright::LineReader r(text, "t.csv");
      std::string_view line;
      while (r.next(line)) {
      }
    } catch (const coilwright::InputError& e) {
      return std::string(e.what());
    }
    return std::string("(no error)");
  };
  CHECK(error_of("a,b\n\xC2\xB5T,\xE2\x84\xA6\n") == "(no error)");  // µ and Ω are UTF-8
  CHECK_THAT(error_of("a,b\nc,\x01\n"), Catch::StartsWith("t.csv:2:3: found the control byte 0x01"));
  CHECK_THAT(error_of("a\r\nb\rc\r\n"), Catch::StartsWith("t.csv:2:2: found a carriage return inside the line"));
  CHECK_THAT(error_of("ab\xC0\xAF\n"), Catch::StartsWith("t.csv:1:3: found the byte 0xC0, which is not valid UTF-8"));  // overlong '/'
  CHECK_THAT(error_of("\xED\xA0\x80\n"), Catch::StartsWith("t.csv:1:1: found the byte 0xED"));  // a surrogate
  CHECK_THAT(error_of("x\n" + std::string(coilwright::kMaxLineBytes + 1, 'a')), Catch::StartsWith("t.csv:2:65537: the line is longer"));
  {  // a byte-order mark is dropped only where it opens the file
    coilwright::LineReader r(std::string_view("x\n\xEF\xBB\xBFy\n"), "t.csv");
    std::string_view line;
    REQUIRE(r.next(line));
    REQUIRE(r.next(line));
    CHECK(line == "\xEF\xBB\xBFy");
  }

  // The stream reader gives the same lines as the text reader, across its block boundaries.
  std::string text = "\xEF\xBB\xBFhead\r\n";
  for (int i = 0; i < 20000; ++i) text += std::to_string(i) + (i % 3 ? "\r\n" : "\n");
  std::istringstream stream(text);
  coilwright::LineReader a(text, "t.csv"), b(stream, "t.csv");
  std::string_view la, lb;
  std::size_t n = 0;
  while (a.next(la)) {
    REQUIRE(b.next(lb));
    REQUIRE(la == lb);
    ++n;
  }
  CHECK(!b.next(lb));
  CHECK(n == 20001);
  CHECK(a.line_number() == 20001);
}
