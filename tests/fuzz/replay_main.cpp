// Replays a fuzz target's inputs without libFuzzer: each argument is a file or a folder (every
// regular file in it, in name order) fed once to LLVMFuzzerTestOneInput. The ordinary test build
// runs the committed corpus and every past crasher this way, so they stay fixed.
#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <iterator>
#include <string>
#include <vector>

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size);

namespace {

void replay(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  if (!in) {
    std::cerr << "cannot read " << file << "\n";
    std::exit(1);
  }
  const std::vector<char> bytes((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  // libFuzzer never passes a null pointer, even for an empty input.
  const std::uint8_t empty = 0;
  (void)LLVMFuzzerTestOneInput(bytes.empty() ? &empty : reinterpret_cast<const std::uint8_t*>(bytes.data()),
                               bytes.size());
}

}  // namespace

int main(int argc, char** argv) {
  std::size_t count = 0;
  for (int a = 1; a < argc; ++a) {
    const std::filesystem::path arg = argv[a];
    if (std::filesystem::is_regular_file(arg)) {
      replay(arg);
      ++count;
      continue;
    }
    if (!std::filesystem::is_directory(arg)) continue;  // e.g. no regressions yet
    std::vector<std::filesystem::path> files;
    for (const auto& e : std::filesystem::directory_iterator(arg))
      if (e.is_regular_file()) files.push_back(e.path());
    std::sort(files.begin(), files.end());
    for (const auto& f : files) {
      std::cout << "replaying " << f.string() << "\n" << std::flush;
      replay(f);
      ++count;
    }
  }
  std::cout << count << " inputs replayed\n";
  return count > 0 ? 0 : 1;
}
