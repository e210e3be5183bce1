// Shared parts of the writers: format names and default ranges.
#include "breathbeat/errors.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/waveform/writers.hpp"

namespace bb::wave {

RecordFormat record_format_from(const std::string& word, const std::string& field) {
  const std::string w = ascii_lower(word);
  if (w == "csv") return RecordFormat::csv;
  if (w == "edf") return RecordFormat::edf;
  if (w == "wfdb") return RecordFormat::wfdb;
  throw InputError(field, word, "is not a record format that can be written", "csv, edf or wfdb");
}

std::optional<RecordFormat> record_format_of(const std::filesystem::path& path) {
  const std::string ext = ascii_lower(path.extension().string());
  if (ext == ".csv") return RecordFormat::csv;
  if (ext == ".edf") return RecordFormat::edf;
  if (ext == ".hea" || ext.empty()) return RecordFormat::wfdb;
  return std::nullopt;
}

// Ranges wide enough for bedside signals in these units (common practice, no source).
ChannelRange default_range(const ChannelInfo& channel) {
  const std::string u = ascii_lower(channel.unit);
  if (u == "mmhg") return {-50.0, 350.0};
  if (u == "cmh2o" || u == "mbar" || u == "hpa") return {-50.0, 150.0};
  if (u == "l/min") return {-300.0, 300.0};
  if (u == "l/s") return {-5.0, 5.0};
  if (u == "ml") return {-1000.0, 4000.0};
  if (u == "l") return {-1.0, 4.0};
  if (u == "mv") return {-10.0, 10.0};
  return {-1000.0, 1000.0};
}

WriteSummary write_record(SignalSource& source, const std::filesystem::path& out,
                          RecordFormat format, const WriteOptions& options) {
  switch (format) {
    case RecordFormat::csv:
      return write_csv(source, out, options);
    case RecordFormat::edf:
      return write_edf(source, out, options);
    case RecordFormat::wfdb:
      return write_wfdb(source, out, options);
  }
  return {};
}

}  // namespace bb::wave
