// EDF and EDF+ (and BDF) recordings, read through EDFlib (Debian libedf-dev).
// Formats: Kemp B, Varri A, Rosa AC, Nielsen KD, Gade J. A simple format for
// exchange of digitized polygraphic recordings. Electroencephalogr Clin
// Neurophysiol 1992;82:391-393. Kemp B, Olivan J. European data format 'plus'
// (EDF+). Clin Neurophysiol 2003;114:1755-1761.
#pragma once

#include <filesystem>
#include <memory>

#include "breathbeat/waveform/source.hpp"

namespace bb::wave {

// Opens an EDF/EDF+/BDF file; every ordinary signal is a channel (annotation
// signals are not). Samples are EDFlib's physical values, read data record by
// data record.
std::unique_ptr<SignalSource> open_edf(const std::filesystem::path& path);

}  // namespace bb::wave
