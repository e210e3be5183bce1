// Shared by the fuzz targets: what counts as a finding, and scratch files for
// the readers that open a path.
//
// A target feeds its bytes to one reader. An InputError / InputErrors is the
// reader's documented answer to bad input and is not a finding; any other
// exception escapes to libFuzzer (which reports it as a crash), as do crashes,
// sanitizer reports, leaks and timeouts.
#pragma once

#include <unistd.h>
#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <fstream>
#include <string>
#include <string_view>

#include "breathbeat/errors.hpp"
#include "breathbeat/waveform/source.hpp"

namespace bb::fuzz {

template <class F>
void expect_input_errors_only(F&& f) {
  try {
    f();
  } catch (const InputError&) {
  } catch (const InputErrors&) {
  }
}

// A folder of this process's own under $TMPDIR (or /tmp), made once.
inline const std::filesystem::path& scratch_dir() {
  static const std::filesystem::path dir = [] {
    const char* tmp = std::getenv("TMPDIR");
    std::filesystem::path d = std::filesystem::path(tmp && *tmp ? tmp : "/tmp") /
                              ("breathbeat-fuzz-" + std::to_string(::getpid()));
    std::filesystem::create_directories(d);
    return d;
  }();
  return dir;
}

inline std::filesystem::path write_scratch(const std::string& name, std::string_view bytes) {
  const std::filesystem::path p = scratch_dir() / name;
  std::ofstream out(p, std::ios::binary | std::ios::trunc);
  out.write(bytes.data(), static_cast<std::streamsize>(bytes.size()));
  return p;
}

// Reads a source to its end, as `breathbeat wave` does, in 60-second chunks.
// Stops after kMaxSamples samples: a header may announce a record of any
// length (a null segment of 10^12 frames is valid WFDB) and reading it all
// is not a fault, only slow.
inline void drain(wave::SignalSource& source) {
  constexpr std::size_t kMaxSamples = std::size_t{1} << 22;
  (void)source.channels();
  (void)source.duration();
  wave::Chunk chunk;
  std::size_t total = 0;
  while (total < kMaxSamples && source.next(chunk, 60.0)) {
    for (const auto& channel : chunk.samples) total += channel.size();
    if (chunk.samples.empty()) ++total;
  }
  (void)source.notes();
}

}  // namespace bb::fuzz
