// The reader interface: opening a record by its extension, and channel roles
// from common labels.
#include <algorithm>
#include <cctype>

#include "breathbeat/errors.hpp"
#include "breathbeat/waveform/csv.hpp"
#include "breathbeat/waveform/edf.hpp"
#include "breathbeat/waveform/source.hpp"
#include "breathbeat/waveform/wfdb.hpp"

namespace bb::wave {

const char* to_string(Role role) {
  switch (role) {
    case Role::arterial_pressure:
      return "arterial pressure";
    case Role::airway_pressure:
      return "airway pressure";
    case Role::flow:
      return "flow";
    case Role::volume:
      return "volume";
    case Role::central_venous_pressure:
      return "central venous pressure";
    case Role::oesophageal_pressure:
      return "oesophageal pressure";
    case Role::respiration:
      return "respiration";
    case Role::ecg:
      return "ECG";
    case Role::other:
      return "other";
  }
  return "other";
}

namespace {

std::string lower_alnum(const std::string& label) {
  std::string out;
  for (unsigned char c : label) {
    if (std::isalnum(c)) out.push_back(static_cast<char>(std::tolower(c)));
  }
  return out;
}

bool starts_with_any(const std::string& s, std::initializer_list<const char*> prefixes) {
  return std::any_of(prefixes.begin(), prefixes.end(),
                     [&](const char* p) { return s.rfind(p, 0) == 0; });
}

bool is_any(const std::string& s, std::initializer_list<const char*> words) {
  return std::any_of(words.begin(), words.end(), [&](const char* w) { return s == w; });
}

}  // namespace

// Labels seen on bedside monitors, ventilators and open databases (common
// practice, no source). "PAP" (pulmonary artery) is not arterial pressure;
// "V" alone is an ECG lead, as in the MIMIC records.
Role role_from_label(const std::string& label) {
  const std::string s = lower_alnum(label);
  if (s.empty()) return Role::other;
  if (starts_with_any(s, {"abp", "art", "ibp", "radial", "femoral"}) || is_any(s, {"ap", "bp"})) {
    return Role::arterial_pressure;
  }
  if (starts_with_any(s, {"cvp", "centralvenous"})) return Role::central_venous_pressure;
  if (starts_with_any(s, {"pes", "poes", "oes", "eso"})) return Role::oesophageal_pressure;
  if (starts_with_any(s, {"paw", "airway", "pao", "pairway"}) || is_any(s, {"aw", "pressure"})) {
    return Role::airway_pressure;
  }
  if (starts_with_any(s, {"flow", "vflow", "flw"})) return Role::flow;
  if (starts_with_any(s, {"vol", "vt"})) return Role::volume;
  if (starts_with_any(s, {"resp", "imp", "rsp"})) return Role::respiration;
  if (starts_with_any(s, {"ecg", "ekg", "mcl"}) ||
      is_any(s, {"i", "ii", "iii", "avr", "avl", "avf", "v", "v1", "v2", "v3", "v4", "v5", "v6"})) {
    return Role::ecg;
  }
  return Role::other;
}

std::unique_ptr<SignalSource> open_record(const std::filesystem::path& path,
                                          const OpenOptions& options) {
  std::string ext = path.extension().string();
  std::transform(ext.begin(), ext.end(), ext.begin(),
                 [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
  std::error_code ec;
  if (!std::filesystem::exists(path, ec)) {
    throw InputError("record", path.string(), "the file does not exist", "an existing record file");
  }
  if (std::filesystem::is_directory(path, ec)) {
    throw InputError("record", path.string(), "is a directory",
                     "a record file: .hea (WFDB), .edf/.bdf or .csv");
  }
  if (ext == ".hea") return open_wfdb(path);
  if (ext == ".edf" || ext == ".bdf") return open_edf(path);
  if (ext == ".csv") return open_csv(path, options.csv_fs);
  throw InputError("record", path.string(), "the file type is not recognised from its extension",
                   ".hea (WFDB), .edf/.bdf (EDF, EDF+, BDF) or .csv");
}

}  // namespace bb::wave
