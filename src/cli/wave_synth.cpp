// breathbeat wave synth: parses options, makes a synthetic record with the
// library, writes it and prints what was written and the true values.
#include "wave_synth.hpp"

#include <iostream>
#include <memory>

#include "breathbeat/waveform/synth.hpp"
#include "breathbeat/waveform/writers.hpp"
#include "cli_common.hpp"
#include "cli_suggest.hpp"
#include "command_files.hpp"

namespace bb::cli {

namespace {

struct SynthCommand {
  std::string out;  // -o,--output (the old spelling --out still works)
  OutputOption output;
  std::string format;
  int wfdb_format = 16;
  std::string gaps;
  std::string seed;
  bool volume = false;
  bool force = false;
  std::unique_ptr<FieldOptions> fields;
};

wave::SynthParams read_params(const SynthCommand& c) {
  const FieldOptions& f = *c.fields;
  wave::SynthParams p;
  if (auto v = f.get<Time>("duration")) p.duration = *v;
  if (auto v = f.number("fs")) p.fs = *v;
  if (auto v = f.get<Frequency>("hr")) p.heart_rate = *v;
  if (auto v = f.get<Frequency>("rr")) p.respiratory_rate = *v;
  if (auto v = f.get<Ratio>("ppv")) p.ppv = *v;
  if (auto v = f.get<Ratio>("noise")) p.noise = *v;
  if (auto v = f.get<Pressure>("drift")) p.drift = *v;
  if (auto v = f.get<Flow>("flow_offset")) p.flow_offset = *v;
  if (auto v = f.get<Ratio>("ectopy")) p.ectopy = *v;
  if (auto v = f.number("gaps")) p.gaps = static_cast<int>(*v);
  if (auto v = f.get<Pressure>("peep")) p.peep = *v;
  if (auto v = f.get<Volume>("vt")) p.tidal_volume = *v;
  if (auto v = f.get<Resistance>("resistance")) p.resistance = *v;
  if (auto v = f.get<Elastance>("elastance")) p.elastance = *v;
  if (auto v = f.number("seed")) p.seed = static_cast<std::uint64_t>(*v);
  p.volume_channel = c.volume;
  return p;
}

wave::RecordFormat format_of(const SynthCommand& c) {
  if (!c.format.empty()) return wave::record_format_from(c.format);
  if (auto f = wave::record_format_of(c.out)) return *f;
  throw InputError("--format", "", "cannot be told from the output file's extension",
                   "--format csv, edf or wfdb");
}

// The files the writer will make (a WFDB record is a .hea and a .dat), each
// refused if it exists, unless --force.
void check_outputs(const SynthCommand& c, wave::RecordFormat format) {
  CommandFiles files;
  const std::filesystem::path out(c.out);
  if (format != wave::RecordFormat::wfdb) {
    files.add_output("--output", out, existing_output(c.force));
    return;
  }
  const std::filesystem::path dir = out.parent_path();
  const std::string name = out.stem().string();
  files.add_output("--output", dir / (name + ".hea"), existing_output(c.force));
  files.add_output("--output", dir / (name + ".dat"), existing_output(c.force));
}

void print_summary(const wave::SynthParams& p, const wave::WriteSummary& s) {
  std::cout << "wrote";
  for (const auto& f : s.files) std::cout << ' ' << f.string();
  std::cout << "\n  " << s.frames << " samples per channel at " << p.fs << " samples/s ("
            << in_seconds(p.duration) << " s)\n"
            << "  true values: heart rate " << in_per_min(p.heart_rate)
            << " /min, respiratory rate " << in_per_min(p.respiratory_rate) << " /min, PPV "
            << in_percent(p.ppv) << " %, R " << in_cmH2O_per_L_per_s(p.resistance)
            << " cmH2O/(L/s), E " << in_cmH2O_per_L(p.elastance) << " cmH2O/L, PEEP "
            << in_cmH2O(p.peep) << " cmH2O, VT " << in_mL(p.tidal_volume) << " mL\n";
  if (s.clipped > 0) std::cout << "  " << s.clipped << " samples clipped to the format's range\n";
}

}  // namespace

void register_wave_synth(CLI::App& wave) {
  auto cmd = std::make_shared<SynthCommand>();
  CLI::App* sub = wave.add_subcommand(
      "synth", "Write a synthetic arterial + airway pressure + flow record with known true values");
  cmd->fields = std::make_unique<FieldOptions>(sub);
  FieldOptions& f = *cmd->fields;
  add_output_option(sub, cmd->output, "Output file, required (.csv, .edf, or .hea for WFDB)");
  sub->add_option("--format", cmd->format, "csv, edf or wfdb (default: from the extension)")
      ->transform(one_of({"csv", "edf", "wfdb"}));
  sub->add_option("--wfdb-format", cmd->wfdb_format, "WFDB storage format, 16 or 212")
      ->check(CLI::IsMember({16, 212}));
  f.add_parameter("duration", Dimension::time, "s", "Record length (s, min, h, d) [default 10min]");
  f.add_parameter("fs", Dimension::number, "", "Samples per second, every channel [default 125]");
  f.add("hr", "Heart rate of the record [default 90]");
  f.add("rr", "Respiratory rate of the record [default 18]");
  f.add("ppv", "Pulse pressure variation, every breath [default 15%]");
  f.add_parameter("noise", Dimension::fraction, "",
                  "Noise SD as a fraction of each signal's swing (0.02 or 2%) [default 0]");
  f.add_parameter("drift", Dimension::pressure, "mmHg",
                  "Arterial baseline wander amplitude [default 0]");
  f.add_parameter("flow_offset", Dimension::flow, "L/min",
                  "Constant offset on the flow channel (sensor drift) [default 0]");
  f.add_parameter("ectopy", Dimension::fraction, "",
                  "Fraction of premature beats (0.05 or 5%) [default 0]");
  f.add_parameter("gaps", Dimension::number, "",
                  "Number of 4-second gaps in arterial pressure [default 0]");
  f.add_parameter("peep", Dimension::pressure, "cmH2O", "PEEP [default 5]");
  f.add("vt", "Tidal volume of the record [default 450]");
  f.add_parameter("resistance", Dimension::resistance, "cmH2O/L/s",
                  "Respiratory system resistance [default 10]");
  f.add_parameter("elastance", Dimension::elastance, "cmH2O/L",
                  "Respiratory system elastance [default 25]");
  f.add_parameter("seed", Dimension::number, "", "Random seed [default 1]");
  sub->add_flag("--volume", cmd->volume, "Add a volume channel (mL)");
  add_force_flag(sub, cmd->force, "Replace an existing output file (both .hea and .dat for WFDB)");
  sub->callback([cmd] {
    resolve_output_option(cmd->output, true, "the output file (.csv, .edf, or .hea for WFDB)");
    cmd->out = cmd->output.path;
    const wave::SynthParams params = read_params(*cmd);
    const wave::RecordFormat format = format_of(*cmd);
    check_outputs(*cmd, format);
    wave::SyntheticRecord record(params);
    wave::WriteOptions options;
    options.wfdb_format = cmd->wfdb_format;
    const wave::WriteSummary summary = wave::write_record(record, cmd->out, format, options);
    print_summary(params, summary);
  });
}

}  // namespace bb::cli
