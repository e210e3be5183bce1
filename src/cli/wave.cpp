// breathbeat wave FILE: beats, breaths, PPV and mechanics from a recorded
// waveform. Parses options, calls the waveform library, prints. The `synth`
// subcommand (wave_synth.cpp) writes synthetic records.
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <iostream>
#include <memory>

#include "breathbeat/io/atomic_file.hpp"
#include "breathbeat/mechanics.hpp"
#include "breathbeat/present/text.hpp"
#include "breathbeat/present/wave.hpp"
#include "breathbeat/present/wave_html.hpp"
#include "breathbeat/units_parse.hpp"
#include "breathbeat/waveform/pipeline.hpp"
#include "breathbeat/waveform/source.hpp"
#include "cli_common.hpp"
#include "cli_suggest.hpp"
#include "command_files.hpp"
#include "commands.hpp"
#include "csv_dialect.hpp"
#include "wave_convert.hpp"
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
  CsvDialectWords csv;  // --delimiter, --decimal
  bool force = false;
  std::string out;  // -o: the output (text, JSON, CSV or the HTML page) to a file
  // The conditions the signals cannot show and the set respiratory rate, from the
  // field registry (the names of calc ppv and trial add-step): add_condition_options.
  std::unique_ptr<FieldOptions> conditions;
  bool allow_implausible = false;  // for the stated height and rate
};

// ---- conditions the signals cannot show (issue 13 item 5) and the set rate (item 6) ----

void add_condition_options(FieldOptions& f) {
  f.add("passive");
  f.add("regular_rhythm");
  f.add("closed_chest");
  f.add("iah");
  f.add("rv_failure");
  f.add("sex", "male or female: with --height, the predicted body weight for VT per kg PBW");
  f.add("height", "Height (cm or m): with --sex, VT from the flow channel per kg PBW");
  f.add("rr",
        "Respiratory rate as set: with arterial pressure alone, PPV over whole cycles of 60/RR s");
}

void read_conditions(const FieldOptions& f, const Thresholds& t, wave::PipelineOptions& o) {
  wave::StatedConditions& k = o.stated;
  k.passive = f.flag("passive");
  k.regular_rhythm = f.flag("regular_rhythm");
  k.closed_chest = f.flag("closed_chest");
  k.intra_abdominal_hypertension = f.flag("iah");
  k.rv_failure = f.flag("rv_failure");
  const std::optional<std::string> sex = f.choice("sex");
  const std::optional<Length> height = f.get<Length>("height");
  if (sex.has_value() != height.has_value()) {
    const char* given = sex ? "sex" : "height";
    const char* missing = sex ? "height" : "sex";
    throw InputError(
        given, sex ? *sex : f.text("height").value_or(""),
        std::string("was given without ") + field_name(missing, FieldContext::command_line),
        "both " + field_name("sex", FieldContext::command_line) + " and " +
            field_name("height", FieldContext::command_line) +
            " (predicted body weight needs both), or neither");
  }
  if (sex && height) {
    if (!(height->value() > 0))
      throw InputError("height", *f.text("height"), "is not positive", "a height such as 175cm");
    t.check_plausible("height", *height);
    k.pbw = predicted_body_weight(*sex == "male" ? Sex::male : Sex::female, *height);
  }
  o.set_rr = f.get<Frequency>("rr");
  if (o.set_rr) {
    if (!(o.set_rr->value() > 0))
      throw InputError("rr", *f.text("rr"), "is not positive", "a rate such as 18/min");
    t.check_plausible("rr", *o.set_rr);
  }
}

// Progress of a long run on stderr, only when stderr is a terminal (never in a
// pipe, a file or CI): stretches longer than three minutes, at most five lines
// a second, each overwriting the last; the line is cleared at the end.
class Progress {
 public:
  Progress() : on_(isatty(fileno(stderr)) == 1 && std::getenv("CI") == nullptr) {}
  ~Progress() { clear(); }
  bool on() const { return on_; }
  void update(Time done, std::optional<Time> total) {
    const double long_run = 180.0;  // s of record
    if (total ? in_seconds(*total) <= long_run : in_seconds(done) <= long_run) return;
    const auto now = std::chrono::steady_clock::now();
    if (shown_ && now - last_ < std::chrono::milliseconds(200)) return;
    last_ = now;
    shown_ = true;
    std::fprintf(stderr, "\r%s\033[K", wave::progress_text(done, total).c_str());
    std::fflush(stderr);
  }
  void clear() {
    if (!shown_) return;
    std::fprintf(stderr, "\r\033[K");
    std::fflush(stderr);
    shown_ = false;
  }

 private:
  bool on_;
  bool shown_ = false;
  std::chrono::steady_clock::time_point last_;
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

// A channel the record does not name in a way the tool can place (no label of
// presets/channel_labels.toml): the error lists the channels; add the options
// that name them.
InputError with_channel_options(const InputError& e) {
  if (e.where() || !e.value().empty()) return e;
  for (const char* id : {"--abp", "--paw", "--flow", "--resp"}) {
    if (e.field() == id) {
      return InputError(e.field(), e.value(), e.problem(),
                        "a channel label the tool knows (docs/waveform-formats.md, \"Channel "
                        "labels\"), or the channels named: --abp NAME (arterial pressure), "
                        "--paw NAME (airway pressure), --flow NAME (flow), --resp NAME "
                        "(respiration)");
    }
  }
  return e;
}

void run_wave(const WaveCommand& c) {
  Thresholds t = Thresholds::built_in();
  if (!c.thresholds_file.empty()) load_site_thresholds(t, c.thresholds_file);
  t.allow_implausible(c.allow_implausible);
  wave::PipelineOptions o = pipeline_options(c);
  read_conditions(*c.conditions, t, o);
  wave::OpenOptions open;
  if (!c.fs.empty())
    open.csv_fs = parse_quantity<Frequency>(c.fs, Field{"--fs", "Hz"}).value();  // Hz
  apply_csv_dialect(c.csv, open);
  std::unique_ptr<wave::SignalSource> source = wave::open_record(c.file, open);
  const wave::ChannelChoice channels =
      wave::choose_channels(source->channels(),
                            o);  // bad channel choice: error before any file is opened

  // No output is the record, one of its files or the thresholds file.
  CommandFiles files;
  add_record_inputs(files, "FILE", c.file);
  if (!c.thresholds_file.empty()) files.add_input("--thresholds", c.thresholds_file);
  if (!c.beats_out.empty()) files.add_output("--beats", c.beats_out, existing_output(c.force));
  if (!c.breaths_out.empty())
    files.add_output("--breaths", c.breaths_out, existing_output(c.force));
  if (!c.out.empty()) files.add_output("--output", c.out, existing_output(c.force));

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
  // The HTML page keeps the windows (one per window, small) and the beats and breaths of its
  // strip, which lies in the first 40 s of the stretch (wave::strip_place).
  const bool html = c.format == "html";
  std::vector<wave::WindowResult> html_windows;
  std::vector<wave::Beat> strip_beats;
  std::vector<wave::Breath> strip_breaths;
  if (html) {
    const double strip_end = (o.from ? in_seconds(*o.from) : 0.0) + 40.0;
    o.on_window = [&](const wave::WindowResult& w) { html_windows.push_back(w); };
    o.on_beat = [&, sink = o.on_beat](const wave::Beat& b) {
      if (sink) sink(b);
      if (in_seconds(b.onset) < strip_end) strip_beats.push_back(b);
    };
    o.on_breath = [&, sink = o.on_breath](const wave::Breath& b, const wave::BreathPpv& p) {
      if (sink) sink(b, p);
      if (in_seconds(b.start) < strip_end) strip_breaths.push_back(b);
    };
  }
  Progress progress;
  if (progress.on()) {
    o.on_progress = [&progress](Time done, std::optional<Time> total) {
      progress.update(done, total);
    };
  }
  const wave::RecordSummary s = wave::analyse_record(*source, o, t);
  progress.clear();
  if (beats_file) beats_file->commit();
  if (breaths_file) breaths_file->commit();

  std::unique_ptr<AtomicFile> out_file;
  if (!c.out.empty()) out_file = std::make_unique<AtomicFile>(c.out);
  std::ostream& out = out_file ? out_file->stream() : std::cout;
  auto done = [&] {
    out << std::flush;
    if (!out_file) return;
    out_file->commit();
    std::cout << "Output written to " << c.out << "\n";
  };
  if (html) {
    const wave::StripPlace place = wave::strip_place(in_seconds(s.start), in_seconds(s.duration));
    std::unique_ptr<wave::SignalSource> again = wave::open_record(c.file, open);
    wave::Strip strip = wave::read_strip(*again, channels, place);
    for (const wave::Beat& b : strip_beats) {
      const double at = in_seconds(b.onset);
      if (at >= place.start && at < place.start + place.duration) strip.beats.push_back(b);
    }
    for (const wave::Breath& b : strip_breaths) {
      const double at = in_seconds(b.start);
      if (at >= place.start && at < place.start + place.duration) strip.breaths.push_back(b);
    }
    out << wave::record_html(c.file, s, t, html_windows, strip);
    done();
    return;
  }

  if (format == wave::TrendFormat::json) {
    wave::write_json_with_windows(out, wave::summary_json(s, t), windows);
    out << "\n";
    done();
    return;
  }
  if (format == wave::TrendFormat::csv) {
    wave::write_window_csv_header(out);
    windows.copy_to(out);
    done();
    return;
  }
  std::string text = to_text(wave::describe_record(s, t));
  out << text << "\nTrend (windows of "
      << format_number(in_seconds(o.window ? *o.window : t.get<Time>("waveform.window")), 0)
      << " s)\n"
      << wave::window_text_header(s.cycles) << "\n";
  windows.copy_to(out);
  done();
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
  add_force_flag(sub, cmd->force, "Replace an existing --beats, --breaths or --output file");
  sub->add_option("--format", cmd->format,
                  "Output: text, json or csv (the window trend), or html (a page with plots)")
      ->transform(one_of({"text", "json", "csv", "html"}));
  sub->add_option("-o,--output", cmd->out,
                  "Write the output to this file (atomically) instead of stdout");
  sub->add_option("--abp", cmd->abp, "Arterial pressure channel name");
  sub->add_option("--paw", cmd->paw, "Airway pressure channel name");
  sub->add_option("--flow", cmd->flow, "Flow channel name");
  sub->add_option("--resp", cmd->resp, "Respiration channel name");
  sub->add_option("--fs", cmd->fs, "Sampling rate of a CSV file without a time column (Hz)");
  add_csv_dialect_options(sub, cmd->csv);
  sub->add_option("--thresholds", cmd->thresholds_file,
                  "Site thresholds file (TOML) overriding the presets");
  cmd->conditions = std::make_unique<FieldOptions>(sub);
  add_condition_options(*cmd->conditions);
  sub->add_flag("--allow-implausible", cmd->allow_implausible,
                "Accept a stated --height or --rr outside the plausible adult ranges (the value "
                "is real)");
  register_wave_synth(*sub);
  register_wave_convert(*sub);
  sub->callback([cmd, sub] {
    if (!sub->get_subcommands().empty()) return;
    if (cmd->file.empty()) {
      throw InputError("file", "", "no record given", "breathbeat wave FILE (.hea, .edf or .csv)");
    }
    try {
      run_wave(*cmd);
    } catch (const InputError& e) {
      throw with_channel_options(as_option(e));
    }
  });
}

}  // namespace bb::cli
