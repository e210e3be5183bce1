// Fuzz target: the EDF path (open_record on a .edf file: EDFlib, then the
// adapter in src/waveform/io/edf.cpp), read to its end and after a seek.
#include <string_view>

#include "breathbeat/waveform/source.hpp"
#include "fuzz_support.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const auto path =
      bb::fuzz::write_scratch("r.edf", std::string_view(reinterpret_cast<const char*>(data), size));
  bb::fuzz::expect_input_errors_only([&] {
    auto source = bb::wave::open_record(path);
    bb::fuzz::drain(*source);
    source->seek(0.5);
    bb::fuzz::drain(*source);
  });
  return 0;
}
