// Every file in tests/bad_configs/ is a config with one mistake. Its first two lines state the
// rule it breaks: `# expect: <part of the message>` and `# line: <line the message points at>`.
// The library must refuse it with that message at that line, and the command line must exit
// with code 2 (bad input). Common practice, no source.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include <sys/wait.h>

#include "coilwright/config.hpp"
#include "coilwright/error.hpp"

namespace {
namespace fs = std::filesystem;

struct Expectation {
  std::string message;
  std::size_t line = 0;
};

Expectation expectation_of(const fs::path& file) {
  std::ifstream in(file);
  std::string first, second;
  std::getline(in, first);
  std::getline(in, second);
  const std::string expect_tag = "# expect: ", line_tag = "# line: ";
  REQUIRE(first.rfind(expect_tag, 0) == 0);
  REQUIRE(second.rfind(line_tag, 0) == 0);
  return {first.substr(expect_tag.size()), static_cast<std::size_t>(std::stoul(second.substr(line_tag.size())))};
}

std::vector<fs::path> bad_configs() {
  std::vector<fs::path> files;
  for (const auto& e : fs::directory_iterator(fs::path(COILWRIGHT_SOURCE_DIR) / "tests" / "bad_configs"))
    if (e.path().extension() == ".toml") files.push_back(e.path());
  std::sort(files.begin(), files.end());
  return files;
}
}  // namespace

TEST_CASE("bad configs: each is refused with its message at its line", "[config][bad_configs]") {
  const auto files = bad_configs();
  CHECK(files.size() >= 24);
  for (const auto& file : files) {
    INFO(file.filename().string());
    const Expectation want = expectation_of(file);
    std::string message = "(no error)";
    coilwright::SourceLocation where;
    try {
      (void)coilwright::load_model(file);
    } catch (const coilwright::InputError& e) {
      message = e.what();
      where = e.where();
    }
    INFO(message);
    CHECK_THAT(message, Catch::Contains(want.message));
    CHECK(where.file == file.string());
    CHECK(where.line == want.line);
    CHECK(where.column > 0);
    CHECK(message.rfind(file.string() + ":" + std::to_string(want.line) + ":", 0) == 0);
  }
}

TEST_CASE("bad configs: the command line exits with code 2", "[config][bad_configs][cli]") {
  for (const auto& file : bad_configs()) {
    INFO(file.filename().string());
    const std::string cmd = std::string("\"") + COILWRIGHT_BINARY + "\" field \"" + file.string() + "\" >/dev/null 2>&1";
    const int status = std::system(cmd.c_str());
    REQUIRE(WIFEXITED(status));
    CHECK(WEXITSTATUS(status) == 2);
  }
}
