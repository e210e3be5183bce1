// EDF/EDF+/BDF through EDFlib: the library parses the file; this adapter
// turns its signals into channels and reads them data record by data record.
#include <algorithm>
#include <cmath>

#include "breathbeat/errors.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/waveform/edf.hpp"

extern "C" {
#include <edflib.h>
}

namespace bb::wave {

namespace {

std::string open_problem(int code) {
  switch (code) {
    case EDFLIB_MALLOC_ERROR:
      return "out of memory while opening";
    case EDFLIB_NO_SUCH_FILE_OR_DIRECTORY:
      return "the file cannot be opened";
    case EDFLIB_FILE_CONTAINS_FORMAT_ERRORS:
      return "the file is not a valid EDF/EDF+/BDF file (format errors, or truncated)";
    case EDFLIB_MAXFILES_REACHED:
      return "too many EDF files are open";
    case EDFLIB_FILE_READ_ERROR:
      return "the file cannot be read";
    case EDFLIB_FILE_ALREADY_OPENED:
      return "the file is already open";
    case EDFLIB_FILETYPE_ERROR:
      return "the file type is not EDF or BDF";
    case EDFLIB_FILE_IS_DISCONTINUOUS:
      return "the file is a discontinuous EDF+D/BDF+D recording, which is not read";
    default:
      return "EDFlib could not open the file (code " + std::to_string(code) + ")";
  }
}

class EdfSource final : public SignalSource {
 public:
  explicit EdfSource(const std::filesystem::path& path)
      : file_(path.string()), header_(std::make_unique<edf_hdr_struct>()) {
    if (edfopen_file_readonly(file_.c_str(), header_.get(), EDFLIB_DO_NOT_READ_ANNOTATIONS) < 0) {
      throw InputError("record", file_, open_problem(header_->filetype),
                       "an EDF, EDF+ (continuous) or BDF file", SourcePlace{file_, 0, 0});
    }
    handle_ = header_->handle;
    record_seconds_ = static_cast<double>(header_->datarecord_duration) / EDFLIB_TIME_DIMENSION;
    if (header_->edfsignals < 1 || record_seconds_ <= 0.0) {
      edfclose_file(handle_);
      throw InputError("record", file_, "the file holds no signals (or zero-length data records)",
                       "an EDF file with at least one signal", SourcePlace{file_, 0, 0});
    }
    for (int i = 0; i < header_->edfsignals; ++i) add_channel(header_->signalparam[i]);
  }

  ~EdfSource() override { edfclose_file(handle_); }
  EdfSource(const EdfSource&) = delete;
  EdfSource& operator=(const EdfSource&) = delete;

  const std::vector<ChannelInfo>& channels() const override { return channels_; }
  std::optional<double> duration() const override {
    return static_cast<double>(header_->datarecords_in_file) * record_seconds_;
  }
  // EDFlib reads every byte with fgetc, and C stdio locks each such call once
  // a second thread exists: measured, that costs more than a second thread
  // gains (docs/performance.md).
  bool prefers_one_thread() const override { return true; }

  void seek(double seconds) override {
    const auto record =
        static_cast<long long>(std::floor(std::max(0.0, seconds) / record_seconds_ + 1e-9));
    record_ = std::min(record, header_->datarecords_in_file);
    for (std::size_t i = 0; i < channels_.size(); ++i) {
      edfseek(handle_, static_cast<int>(i), record_ * per_record_[i], EDFSEEK_SET);
    }
  }

  // At most `max_seconds`, but at least one data record.
  bool next(Chunk& chunk, double max_seconds) override {
    const long long left = header_->datarecords_in_file - record_;
    if (left <= 0) return false;
    const auto wanted = static_cast<long long>(std::floor(max_seconds / record_seconds_ + 1e-9));
    const long long n = std::clamp<long long>(wanted, 1, left);
    chunk.samples.resize(channels_.size());
    for (std::size_t i = 0; i < channels_.size(); ++i) {
      auto& out = chunk.samples[i];
      out.resize(static_cast<std::size_t>(n * per_record_[i]));
      const int got = edfread_physical_samples(handle_, static_cast<int>(i),
                                               static_cast<int>(out.size()), out.data());
      if (got != static_cast<int>(out.size())) {
        throw InputError("record", file_, "EDFlib could not read the samples (file truncated?)",
                         "a complete EDF file", SourcePlace{file_, 0, 0});
      }
    }
    chunk.start_time = static_cast<double>(record_) * record_seconds_;
    chunk.duration = static_cast<double>(n) * record_seconds_;
    record_ += n;
    return true;
  }

 private:
  void add_channel(const edf_param_struct& p) {
    ChannelInfo c;
    c.name = trim(p.label);
    c.unit = trim(p.physdimension);
    c.fs = static_cast<double>(p.smp_in_datarecord) / record_seconds_;
    c.role = role_from_label(c.name);
    channels_.push_back(c);
    per_record_.push_back(p.smp_in_datarecord);
  }

  std::string file_;
  std::unique_ptr<edf_hdr_struct> header_;
  int handle_ = -1;
  double record_seconds_ = 1.0;
  long long record_ = 0;
  std::vector<ChannelInfo> channels_;
  std::vector<long long> per_record_;
};

}  // namespace

std::unique_ptr<SignalSource> open_edf(const std::filesystem::path& path) {
  return std::make_unique<EdfSource>(path);
}

}  // namespace bb::wave
