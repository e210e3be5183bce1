// Fuzz target: a WFDB record read to its end (header, then the signal
// decoder of every storage format). Input: the header text, a NUL byte, then
// the bytes of the signal file, written as r.hea and r.dat (a header naming
// other files finds none: an InputError).
#include <cstring>
#include <string_view>

#include "breathbeat/waveform/wfdb.hpp"
#include "fuzz_support.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view all(reinterpret_cast<const char*>(data), size);
  const std::size_t nul = all.find('\0');
  if (nul == std::string_view::npos) return 0;
  const auto hea = bb::fuzz::write_scratch("r.hea", all.substr(0, nul));
  bb::fuzz::write_scratch("r.dat", all.substr(nul + 1));
  bb::fuzz::expect_input_errors_only([&] {
    auto source = bb::wave::open_wfdb(hea);
    bb::fuzz::drain(*source);
  });
  bb::fuzz::expect_input_errors_only([&] {
    auto source = bb::wave::open_wfdb(hea, bb::wave::WfdbOptions{false});
    source->seek(1.0);
    bb::fuzz::drain(*source);
  });
  return 0;
}
