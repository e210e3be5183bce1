// Replays fuzz inputs through a target without libFuzzer (for ctest, with any
// compiler): every file named, or found under a folder named, is one input.
// Fails when an input crashes the target (the process dies) or when no input
// was found (a wrong path must not pass).
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <string>
#include <vector>

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size);

namespace {
int replay(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  const std::string bytes((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  std::vector<std::uint8_t> copy(bytes.begin(), bytes.end());  // exact size, for ASan
  LLVMFuzzerTestOneInput(copy.data(), copy.size());
  return 1;
}
}  // namespace

int main(int argc, char** argv) {
  int count = 0;
  for (int i = 1; i < argc; ++i) {
    const std::filesystem::path arg(argv[i]);
    if (std::filesystem::is_directory(arg)) {
      for (const auto& entry : std::filesystem::recursive_directory_iterator(arg)) {
        if (entry.is_regular_file()) count += replay(entry.path());
      }
    } else if (std::filesystem::is_regular_file(arg)) {
      count += replay(arg);
    }
  }
  std::printf("replayed %d inputs\n", count);
  return count > 0 ? 0 : 1;
}
