// The reader interface: opening a record by its extension, and channel roles
// from the label table (presets/channel_labels.toml).
#include <algorithm>
#include <cctype>
#include <stdexcept>

#include "breathbeat/errors.hpp"
#include "breathbeat/presets.hpp"
#include "breathbeat/text/strings.hpp"
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

Role role_named(const std::string& word) {
  static constexpr Role kRoles[] = {
      Role::arterial_pressure,       Role::airway_pressure,      Role::flow,        Role::volume,
      Role::central_venous_pressure, Role::oesophageal_pressure, Role::respiration, Role::ecg};
  for (Role r : kRoles) {
    std::string name = to_string(r);
    std::replace(name.begin(), name.end(), ' ', '_');
    if (ascii_lower(name) == word) return r;
  }
  throw std::logic_error("presets/channel_labels.toml: unknown role " + word);
}

struct RoleMatcher {
  struct Entry {
    Role role;
    const presets::ChannelLabels* labels;
  };
  std::vector<Entry> entries;
  RoleMatcher() {
    for (const auto& c : presets::channel_labels().channels)
      entries.push_back({role_named(c.role), &c});
  }
};

}  // namespace

// The label table is data: presets/channel_labels.toml (common practice, no
// source). An exact word wins, then the longest prefix.
Role role_from_label(const std::string& label) {
  static const RoleMatcher matcher;
  const std::string s = presets::label_key(label);
  if (s.empty()) return Role::other;
  for (const auto& e : matcher.entries) {
    for (const auto& w : e.labels->exact)
      if (s == w) return e.role;
  }
  Role best = Role::other;
  std::size_t longest = 0;
  for (const auto& e : matcher.entries) {
    for (const auto& p : e.labels->prefixes) {
      if (p.size() > longest && s.compare(0, p.size(), p) == 0) {
        best = e.role;
        longest = p.size();
      }
    }
  }
  return best;
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
  if (ext != ".csv" && (options.csv_delimiter || options.csv_decimal)) {
    throw InputError(options.csv_delimiter ? "--delimiter" : "--decimal", path.string(),
                     "applies to CSV records only", "no --delimiter or --decimal for this record");
  }
  if (ext == ".hea") return open_wfdb(path);
  if (ext == ".edf" || ext == ".bdf") return open_edf(path);
  if (ext == ".csv") return open_csv(path, options);
  throw InputError("record", path.string(), "the file type is not recognised from its extension",
                   ".hea (WFDB), .edf/.bdf (EDF, EDF+, BDF) or .csv");
}

}  // namespace bb::wave
