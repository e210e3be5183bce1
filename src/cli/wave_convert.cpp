// breathbeat wave convert: a stretch of a record written in another open
// format (CSV, EDF+ or WFDB). Parses options, calls the waveform library,
// writes through its writers (atomic) and prints what was written.
#include "wave_convert.hpp"

#include <iostream>
#include <memory>
#include <sstream>

#include "breathbeat/units_parse.hpp"
#include "breathbeat/waveform/stretch.hpp"
#include "breathbeat/waveform/writers.hpp"
#include "cli_common.hpp"
#include "cli_suggest.hpp"
#include "command_files.hpp"
#include "csv_dialect.hpp"

namespace bb::cli {

namespace {

struct ConvertCommand {
  std::string file;
  std::string out;  // -o,--output (the old spelling --out still works)
  OutputOption output;
  std::string format;
  std::string from, to, channels, fs;
  CsvDialectWords csv;  // --delimiter, --decimal
  int wfdb_format = 16;
  bool force = false;
};

std::optional<double> seconds_option(const std::string& text, const char* name) {
  if (text.empty()) return std::nullopt;
  return in_seconds(parse_quantity<Time>(text, Field{name, "s"}));
}

std::vector<std::string> channel_names(const std::string& list) {
  std::vector<std::string> names;
  std::stringstream in(list);
  for (std::string name; std::getline(in, name, ',');) {
    if (name.empty())
      throw InputError("--channels", list, "has an empty name", "names such as ABP,Paw");
    names.push_back(name);
  }
  return names;
}

wave::RecordFormat format_of(const ConvertCommand& c) {
  if (!c.format.empty()) return wave::record_format_from(c.format);
  if (auto f = wave::record_format_of(c.out)) return *f;
  throw InputError("--format", "", "cannot be told from the output file's extension",
                   "--format csv, edf or wfdb");
}

// The record's errors name "from", "to", "channels"; here they are options,
// with the value as it was typed.
InputError as_option(const InputError& e, const ConvertCommand& c) {
  if (e.where()) return e;
  if (e.field() == "from") return InputError("--from", c.from, e.problem(), e.expected());
  if (e.field() == "to") return InputError("--to", c.to, e.problem(), e.expected());
  if (e.field() == "channels")
    return InputError("--channels", e.value(), e.problem(), e.expected());
  return e;
}

void run_convert(const ConvertCommand& c) {
  const wave::RecordFormat format = format_of(c);
  CommandFiles files;
  add_record_inputs(files, "FILE", c.file);
  const std::filesystem::path out(c.out);
  if (format == wave::RecordFormat::wfdb) {
    const std::filesystem::path dir = out.parent_path();
    files.add_output("--output", dir / (out.stem().string() + ".hea"), existing_output(c.force));
    files.add_output("--output", dir / (out.stem().string() + ".dat"), existing_output(c.force));
  } else {
    files.add_output("--output", out, existing_output(c.force));
  }

  wave::OpenOptions open;
  if (!c.fs.empty()) open.csv_fs = parse_quantity<Frequency>(c.fs, Field{"--fs", "Hz"}).value();
  apply_csv_dialect(c.csv, open);
  wave::StretchOptions stretch;
  stretch.from = seconds_option(c.from, "--from");
  stretch.to = seconds_option(c.to, "--to");
  if (!c.channels.empty()) stretch.channels = channel_names(c.channels);
  stretch.common_rate = format == wave::RecordFormat::csv;  // one time column for every channel
  std::unique_ptr<wave::SignalSource> source;
  try {
    source = wave::select_stretch(wave::open_record(c.file, open), stretch);
  } catch (const InputError& e) {
    throw as_option(e, c);
  }
  wave::WriteOptions options;
  options.wfdb_format = c.wfdb_format;
  wave::WriteSummary summary;
  try {
    summary = wave::write_record(*source, out, format, options);
  } catch (const InputError& e) {
    throw as_option(e, c);
  }

  std::cout << "wrote";
  for (const auto& f : summary.files) std::cout << ' ' << f.string();
  std::cout << "\n  channels:";
  for (const auto& ch : source->channels())
    std::cout << ' ' << ch.name << " [" << ch.unit << "] " << format_number(ch.fs, 0) << "/s;";
  std::cout << "\n  " << summary.frames << " samples per channel";
  if (stretch.from) std::cout << "; time 0 is " << c.from << " into " << c.file;
  std::cout << "\n";
  if (summary.missing > 0)
    std::cout << "  " << summary.missing << " samples missing in the record, written as gaps\n";
  if (summary.clipped > 0)
    std::cout << "  " << summary.clipped
              << " samples outside the format's range, stored at its limit\n";
}

}  // namespace

void register_wave_convert(CLI::App& wave) {
  auto cmd = std::make_shared<ConvertCommand>();
  CLI::App* sub = wave.add_subcommand(
      "convert", "Write a stretch of a record as CSV, EDF+ or WFDB (physical values)");
  sub->add_option("FILE", cmd->file, "Record: WFDB header (.hea), EDF/EDF+ (.edf) or CSV (.csv)")
      ->required();
  add_output_option(sub, cmd->output, "Output file, required (.csv, .edf, or .hea for WFDB)");
  sub->add_option("--format", cmd->format, "csv, edf or wfdb (default: from the extension)")
      ->transform(one_of({"csv", "edf", "wfdb"}));
  sub->add_option("--from", cmd->from, "Start of the stretch (e.g. 60s, 5min; default the start)");
  sub->add_option("--to", cmd->to, "End of the stretch (default the end)");
  sub->add_option("--channels", cmd->channels,
                  "Channels to keep, by name, comma-separated (default all; record order kept)");
  sub->add_option("--fs", cmd->fs, "Sampling rate of a CSV record without a time column (Hz)");
  add_csv_dialect_options(sub, cmd->csv);
  sub->add_option("--wfdb-format", cmd->wfdb_format, "WFDB storage format, 16 or 212")
      ->check(CLI::IsMember({16, 212}));
  add_force_flag(sub, cmd->force, "Replace an existing output file (both .hea and .dat for WFDB)");
  sub->callback([cmd] {
    resolve_output_option(cmd->output, true, "the output file (.csv, .edf, or .hea for WFDB)");
    cmd->out = cmd->output.path;
    run_convert(*cmd);
  });
}

}  // namespace bb::cli
