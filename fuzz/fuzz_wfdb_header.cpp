// Fuzz target: the WFDB header parser (parse_wfdb_header).
#include <sstream>
#include <string>

#include "breathbeat/waveform/wfdb.hpp"
#include "fuzz_support.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  std::istringstream in(std::string(reinterpret_cast<const char*>(data), size));
  bb::fuzz::expect_input_errors_only([&] { (void)bb::wave::parse_wfdb_header(in, "fuzz.hea"); });
  return 0;
}
