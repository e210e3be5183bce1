// breathbeat wave FILE: beats, breaths, PPV and mechanics from a recorded
// waveform. Parses options, calls the waveform library, prints. The `synth`
// subcommand (wave_synth.cpp) writes synthetic records.
#include <iostream>
#include <memory>

#include "breathbeat/io/atomic_file.hpp"
#include "breathbeat/present/text.hpp"
#include "breathbeat/present/wave.hpp"
#include "breathbeat/units_parse.hpp"
#include "breathbeat/waveform/pipeline.hpp"
#include "breathbeat/waveform/source.hpp"
#include "cli_common.hpp"
#include "commands.hpp"
#include "wave_synth.hpp"

namespace bb::cli {

namespace {

struct WaveCommand {
  std::string file;
  std::string from, to, window, fs;
  std::string beats_out, breaths_out;
  std::string format = "text";
  std::string thresholds_file;
  std::string abp, paw, flow, resp;
};

std::optional<Time> time_option(const std::string& text, const char* name) {
  if (text.empty()) return std::nullopt;
  return parse_quantity<Time>(text, Field{name, "s"});
}

wave::PipelineOptions pipeline_options(const WaveCommand& c) {
  wave::PipelineOptions o;
  o.abp = c.abp;
  o.paw = c.paw;
  o.flow = c.flow;
  o.resp = c.resp;
  o.from = time_option(c.from, "--from");
  o.to = time_option(c.to, "--to");
  o.window = time_option(c.window, "--window");
  if (o.from && in_seconds(*o.from) < 0)
    throw InputError("--from", c.from, "is negative", "a time from the start");
  if (o.from && o.to && *o.to <= *o.from) {
    throw InputError("--to", c.to, "is not after --from", "a time later than " + c.from);
  }
  return o;
}

// The waveform engine names its inputs by field id (abp, window, ...); here
// they are options.
InputError as_option(const InputError& e) {
  for (const char* id : {"abp", "paw", "flow", "resp", "window", "from", "to"}) {
    if (e.field() == id && !e.where()) {
      return InputError(std::string("--") + id, e.value(), e.problem(), e.expected());
    }
  }
  return e;
}

void run_wave(const WaveCommand& c) {
  Thresholds t = Thresholds::built_in();
  if (!c.thresholds_file.empty()) t.load_overrides(c.thresholds_file);
  wave::PipelineOptions o = pipeline_options(c);
  wave::OpenOptions open;
  if (!c.fs.empty())
    open.csv_fs = parse_quantity<Frequency>(c.fs, Field{"--fs", "Hz"}).value();  // Hz
  std::unique_ptr<wave::SignalSource> source = wave::open_record(c.file, open);
  wave::choose_channels(source->channels(),
                        o);  // bad channel choice: error before any file is opened

  std::unique_ptr<AtomicFile> beats_file, breaths_file;
  if (!c.beats_out.empty()) {
    beats_file = std::make_unique<AtomicFile>(c.beats_out);
    wave::write_beat_csv_header(beats_file->stream());
    o.on_beat = [&](const wave::Beat& b) { wave::write_beat_csv_row(beats_file->stream(), b); };
  }
  if (!c.breaths_out.empty()) {
    breaths_file = std::make_unique<AtomicFile>(c.breaths_out);
    wave::write_breath_csv_header(breaths_file->stream());
    o.on_breath = [&](const wave::Breath& b, const wave::BreathPpv& p) {
      wave::write_breath_csv_row(breaths_file->stream(), b, p);
    };
  }
  // Windows go to a temporary file as they close and are printed after the
  // summary: memory stays flat, and an error prints nothing.
  const wave::TrendFormat format = c.format == "json"  ? wave::TrendFormat::json
                                   : c.format == "csv" ? wave::TrendFormat::csv
                                                       : wave::TrendFormat::text;
  wave::TrendSpool windows(format);
  o.on_window = [&](const wave::WindowResult& w) { windows.add(w); };
  const wave::RecordSummary s = wave::analyse_record(*source, o, t);
  if (beats_file) beats_file->commit();
  if (breaths_file) breaths_file->commit();

  if (format == wave::TrendFormat::json) {
    wave::write_json_with_windows(std::cout, wave::summary_json(s, t), windows);
    std::cout << "\n";
    return;
  }
  if (format == wave::TrendFormat::csv) {
    wave::write_window_csv_header(std::cout);
    windows.copy_to(std::cout);
    return;
  }
  std::string text = to_text(wave::describe_record(s, t));
  std::cout << text << "\nTrend (windows of "
            << format_number(in_seconds(o.window ? *o.window : t.get<Time>("waveform.window")), 0)
            << " s)\n"
            << wave::window_text_header() << "\n";
  windows.copy_to(std::cout);
  std::cout << std::flush;
}

}  // namespace

void register_wave(CLI::App& app) {
  auto cmd = std::make_shared<WaveCommand>();
  CLI::App* sub = app.add_subcommand(
      "wave", "Beats, breaths, PPV and mechanics from a recorded waveform (WFDB .hea, EDF, CSV)");
  sub->add_option("file", cmd->file, "Record: WFDB header (.hea), EDF/EDF+ (.edf) or CSV (.csv)");
  sub->add_option("--from", cmd->from, "Start of the stretch analysed (e.g. 60s, 5min)");
  sub->add_option("--to", cmd->to, "End of the stretch analysed");
  sub->add_option("--window", cmd->window, "Window of the trend (default 30s)");
  sub->add_option("--beats", cmd->beats_out, "Write every beat to this CSV file");
  sub->add_option("--breaths", cmd->breaths_out, "Write every breath to this CSV file");
  sub->add_option("--format", cmd->format, "Output: text, json or csv (the window trend)")
      ->check(CLI::IsMember({"text", "json", "csv"}));
  sub->add_option("--abp", cmd->abp, "Arterial pressure channel name");
  sub->add_option("--paw", cmd->paw, "Airway pressure channel name");
  sub->add_option("--flow", cmd->flow, "Flow channel name");
  sub->add_option("--resp", cmd->resp, "Respiration channel name");
  sub->add_option("--fs", cmd->fs, "Sampling rate of a CSV file without a time column (Hz)");
  sub->add_option("--thresholds", cmd->thresholds_file,
                  "Site thresholds file (TOML) overriding the presets");
  register_wave_synth(*sub);
  sub->callback([cmd, sub] {
    if (!sub->get_subcommands().empty()) return;
    if (cmd->file.empty()) {
      throw InputError("file", "", "no record given", "breathbeat wave FILE (.hea, .edf or .csv)");
    }
    try {
      run_wave(*cmd);
    } catch (const InputError& e) {
      throw as_option(e);
    }
  });
}

}  // namespace bb::cli
