// breathbeat report, check, trial new, trial add-step, trial void-step: parse options, call the
// trial library, print or write. No physiology here.
#include <ctime>
#include <filesystem>
#include <iostream>
#include <memory>

#include "breathbeat/io/atomic_file.hpp"
#include "breathbeat/present/report.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "breathbeat/trial/side_by_side.hpp"
#include "breathbeat/trial/trial_file.hpp"
#include "breathbeat/trial/waveform_step.hpp"
#include "cli_common.hpp"
#include "command_files.hpp"
#include "commands.hpp"
#include "step_options.hpp"

namespace bb::cli {

namespace {

struct ReadOptions {
  std::string thresholds_file;
  bool allow_implausible = false;
};

void add_read_options(CLI::App* sub, ReadOptions& o) {
  sub->add_option(
      "--thresholds", o.thresholds_file,
      "Site thresholds file (TOML) overriding the built-in presets and the trial's own");
  sub->add_flag("--allow-implausible", o.allow_implausible,
                "Accept values outside the plausible adult ranges (the value is real)");
}

TrialReadOptions read_options(const ReadOptions& o, bool require_steps = true) {
  TrialReadOptions r;
  r.thresholds_file = o.thresholds_file;
  r.allow_implausible = o.allow_implausible;
  r.require_steps = require_steps;
  return r;
}

// A trial file's deprecation notes (old keys), on stderr only.
void print_notes(const std::vector<std::string>& notes) {
  for (const std::string& n : notes) std::cerr << "breathbeat: " << n << "\n";
}

// Reads a trial file and prints its notes.
LoadedTrial load_trial(const std::string& file, const TrialReadOptions& options) {
  LoadedTrial loaded = load_trial_file(file, options);
  print_notes(loaded.notes);
  return loaded;
}

// ---- report ---------------------------------------------------------------------

struct ReportCommand {
  std::vector<std::string> files;
  std::string format = "text";
  std::string out;
  std::string reference;
  bool force = false;
  ReadOptions read;
};

void register_report(CLI::App& app) {
  auto cmd = std::make_shared<ReportCommand>();
  CLI::App* sub = app.add_subcommand("report", "The per-setting heart-lung report of a trial file");
  sub->add_option("FILE", cmd->files,
                  "Trial file (TOML; docs/trial-file.md); several trials of one patient are set "
                  "side by side, each step named by its trial's date")
      ->required();
  sub->add_option("--format", cmd->format, "text (default), json, csv or html");
  sub->add_option("-o,--output", cmd->out,
                  "Write the report to this file (atomically) instead of stdout");
  sub->add_option("--reference", cmd->reference,
                  "Label of the reference step (default: the first step)");
  add_force_flag(sub, cmd->force, "Replace an existing --output file (never a trial file)");
  add_read_options(sub, cmd->read);
  sub->callback([cmd] {
    const ReportFormat format = parse_report_format(ascii_lower(cmd->format));
    // The same file given twice (by any name: same device and inode) is not a second trial.
    for (std::size_t i = 0; i < cmd->files.size(); ++i) {
      for (std::size_t k = 0; k < i; ++k) {
        if (same_file(cmd->files[k], cmd->files[i])) {
          throw InputError("FILE", cmd->files[i], "is the same file as " + cmd->files[k],
                           "different trial files of one patient to set side by side");
        }
      }
    }
    std::vector<LoadedTrial> loaded;
    for (const std::string& file : cmd->files) {
      loaded.push_back(load_trial(file, read_options(cmd->read)));
      apply_step_waveforms(loaded.back().trial, loaded.back().limits);
    }
    if (loaded.size() > 1 && !cmd->reference.empty()) {
      throw InputError("--reference", cmd->reference, "names a step of one trial only",
                       "one trial file with --reference; side by side each trial is read "
                       "against its own first step");
    }
    std::vector<const Trial*> trials;
    std::vector<TrialAnalysis> analyses;
    for (const LoadedTrial& l : loaded) {
      if (!trials.empty()) {
        try {
          check_same_patient(*trials.front(), l.trial);
        } catch (const InputError& e) {
          throw InputError("FILE", e.value(), e.problem(), e.expected());
        }
      }
      trials.push_back(&l.trial);
      analyses.push_back(analyse_with_reference(l, cmd->reference));
    }
    const TrialAnalysis analysis = analyses.size() == 1 ? std::move(analyses.front())
                                                        : side_by_side(trials, std::move(analyses));
    const std::string text = render_report(analysis, format);
    if (cmd->out.empty()) {
      std::cout << text << std::flush;
      return;
    }
    // The output is never the trial, a record it names or the thresholds file,
    // and never replaces another trial file.
    CommandFiles files;
    for (const std::string& file : cmd->files) files.add_input("FILE", file);
    if (!cmd->read.thresholds_file.empty())
      files.add_input("--thresholds", cmd->read.thresholds_file);
    for (const LoadedTrial& l : loaded) add_trial_record_inputs(files, l.trial);
    files.add_output(
        "--output", cmd->out,
        looks_like_trial_file(cmd->out) ? ExistingOutput::never : existing_output(cmd->force));
    write_file_atomically(cmd->out, text);
    std::cout << "Report written to " << cmd->out << "\n";
  });
}

// ---- check ----------------------------------------------------------------------

struct CheckCommand {
  std::string file;
  ReadOptions read;
};

void register_check(CLI::App& app) {
  auto cmd = std::make_shared<CheckCommand>();
  CLI::App* sub = app.add_subcommand(
      "check", "Validate a trial file and list every problem, without reporting");
  sub->add_option("FILE", cmd->file, "Trial file (TOML)")->required();
  add_read_options(sub, cmd->read);
  sub->callback([cmd] {
    const LoadedTrial loaded = load_trial(cmd->file, read_options(cmd->read));
    // A waveform window outside its record is refused here, as add-step refuses it.
    for (const TrialStep& step : loaded.trial.steps) check_step_window(loaded.trial, step);
    const std::size_t n = loaded.trial.steps.size();
    const std::size_t voided = loaded.trial.voided.size();
    std::cout << "OK: " << cmd->file << ": " << n << " step" << (n == 1 ? "" : "s");
    if (voided) std::cout << " in force (" << voided << " more voided)";
    std::cout << ", no problems found.\n";
  });
}

// ---- trial new ------------------------------------------------------------------

// The value of each given field of `table`, with the option it was given as.
std::vector<FieldValue> given_values(const FieldOptions& fields, std::string_view table) {
  std::vector<FieldValue> values;
  for (const FieldSpec* f : fields_of_table(table)) {
    const std::string id(f->id);
    if (f->kind == FieldKind::flag) {
      if (const auto b = fields.flag(id))
        values.push_back({id, *b ? "true" : "false", field_name(id, FieldContext::command_line)});
    } else if (f->kind == FieldKind::choice) {
      if (const auto word = fields.choice(id)) values.push_back({id, *word, fields.shown_name(id)});
    } else if (const auto text = fields.text(id)) {
      values.push_back({id, *text, fields.shown_name(id)});
    }
  }
  return values;
}

struct NewCommand {
  std::string file;
  std::unique_ptr<FieldOptions> fields;
  std::string old_label;  // --label, the old spelling of --patient-label
  CLI::Option* old_label_option = nullptr;
  ReadOptions read;
};

void register_new(CLI::App& trial) {
  auto cmd = std::make_shared<NewCommand>();
  CLI::App* sub = trial.add_subcommand("new", "Start a new trial file (refuses to overwrite one)");
  sub->add_option("FILE", cmd->file, "Trial file to create")->required();
  cmd->fields = std::make_unique<FieldOptions>(sub);
  for (const FieldSpec* f : fields_of_table("patient")) {
    CLI::Option* o = cmd->fields->add(f->id);
    if (f->id == "sex" || f->id == "height") o->required();
  }
  for (const FieldSpec* f : fields_of_table("trial")) cmd->fields->add(f->id);
  // Before the registry, `trial new` named the patient's label --label.
  const FieldSpec* patient_label = &field_spec("patient_label");
  cmd->old_label_option = sub->add_option("--label", cmd->old_label, "")->group("");
  add_read_options(sub, cmd->read);
  sub->callback([cmd, patient_label] {
    if (std::filesystem::exists(cmd->file)) {
      throw InputError("FILE", cmd->file, "already exists",
                       "a new file name; trial new never overwrites");
    }
    std::vector<FieldValue> values = given_values(*cmd->fields, "trial");
    for (FieldValue& v : given_values(*cmd->fields, "patient")) values.push_back(std::move(v));
    if (cmd->old_label_option->count()) {
      // Checked here, not with CLI11's excludes(), which would print the hidden old
      // spelling as an empty "Excludes:" in the help of --patient-label.
      if (cmd->fields->given(patient_label->id)) {
        throw InputError("--label", cmd->old_label,
                         "is the old spelling of " + option_name(*patient_label),
                         "one of them, not both");
      }
      std::cerr << "breathbeat: "
                << deprecation_note("--label", AliasHit{patient_label, false},
                                    FieldContext::command_line)
                << "\n";
      values.push_back({std::string(patient_label->id), cmd->old_label, "--label"});
    }
    const std::string text = new_trial_text(values, read_options(cmd->read, false));
    if (std::filesystem::exists(cmd->file)) {
      throw InputError("FILE", cmd->file, "already exists",
                       "a new file name; trial new never overwrites");
    }
    write_file_atomically(cmd->file, text, AtomicCommit::keep_existing);
    std::cout << "Created " << cmd->file
              << " (no steps yet; add them with breathbeat trial add-step)\n";
  });
}

// ---- trial add-step ---------------------------------------------------------------

// The tables of a step that add-step writes whole; every field of them is an option.
constexpr const char* kStepTables[] = {"ventilator", "hold",         "gases",    "circulation",
                                       "ultrasound", "peep_release", "challenge"};
// The preload test's fields other than --kind, --measure, --before and --after.
constexpr const char* kPreloadFields[] = {"hold", "volume", "duration", "fluid"};

// Writes `updated` over the trial file, which must still hold `existing`: a
// trial file is this command's input and output by design, only ever appended to.
void append_to_trial(const std::string& file, const std::string& existing,
                     const std::string& updated, const char* what) {
  if (read_text_file(file) != existing) {
    throw InputError("FILE", file, std::string("changed while the ") + what + " was being added",
                     "to run the command again");
  }
  if (updated.compare(0, existing.size(), existing) != 0)
    throw std::logic_error("the trial commands would change the earlier text of " + file);
  write_file_atomically(file, updated);
}

// The record as the trial file names it: relative to the trial file's folder
// (typed relative to the current folder), which must exist.
std::string record_in_trial(const FieldOptions& fields, const std::string& trial_file) {
  namespace fs = std::filesystem;
  const std::string typed = fields.text("record").value();
  const std::string& option = fields.shown_name("record");
  std::error_code ec;
  if (!fs::exists(typed, ec)) {
    throw InputError(option, typed, "does not exist",
                     "a record (WFDB .hea, EDF or CSV), its path from the current folder");
  }
  if (!fs::is_regular_file(typed, ec))
    throw InputError(option, typed, "is not a file", "a record (WFDB .hea, EDF or CSV)");
  const fs::path base = fs::absolute(fs::path(trial_file)).parent_path().lexically_normal();
  const fs::path record = fs::absolute(fs::path(typed)).lexically_normal();
  const fs::path relative = record.lexically_relative(base);
  return (relative.empty() ? record : relative).generic_string();
}

// The [[step.infusion]] records of --drug ... and each --infusion, each line
// named by the option that gave it.
std::vector<std::vector<FieldValue>> infusion_values(const FieldOptions& fields) {
  std::vector<std::vector<FieldValue>> out;
  for (const InfusionText& t : infusion_texts(fields)) {
    const bool own = t.option == fields.shown_name("drug");
    const auto option = [&](const char* id) { return own ? fields.shown_name(id) : t.option; };
    std::vector<FieldValue> v{{"drug", t.drug, t.option}};
    if (t.rate) v.push_back({"rate", *t.rate, option("rate")});
    if (t.concentration) v.push_back({"concentration", *t.concentration, option("concentration")});
    if (t.dose) v.push_back({"dose", *t.dose, option("dose")});
    out.push_back(std::move(v));
  }
  return out;
}

// The preload test: [step.preload.<kind>] with its measure written out (as
// calc preload-test reads it from the units or --measure).
void add_preload_test(const FieldOptions& fields, StepRecord& step) {
  const std::string& kind_option = fields.shown_name("kind");
  if (!fields.given("kind")) {
    for (const char* id : {"measure", "before", "after", "hold", "volume", "duration", "fluid"}) {
      if (!fields.given(id)) continue;
      // On a manoeuvre step the fluid, volume, duration and hold are the manoeuvre's own.
      const FieldSpec* twin = find_field(std::string("challenge_") + id);
      if (fields.given("manoeuvre") && twin != nullptr) {
        throw InputError(
            fields.shown_name(id), fields.text(id).value_or(""),
            "belongs to a preload test within this step (" + kind_option +
                "), not to the manoeuvre of the step before",
            option_name(*twin) + " (" + ascii_lower(twin->label) + " in the manoeuvre)");
      }
      throw InputError(kind_option, "", "is missing (" + fields.shown_name(id) + " was given)",
                       kind_option + " vt_challenge|eeo|plr|fluid_challenge|mini_fluid with " +
                           fields.shown_name("before") + " and " + fields.shown_name("after"));
    }
    return;
  }
  const PreloadTestKind kind = preload_kind(fields);
  for (const char* id : {"before", "after"}) {
    if (!fields.given(id)) {
      throw InputError(fields.shown_name(id), "", "is missing",
                       std::string("the value measured ") + id + " the " + display_name(kind));
    }
  }
  const PreloadMeasure measure = preload_measure(fields, kind);
  step.preload_test = id_of(kind);
  step.preload.push_back({"measure", to_string(measure),
                          fields.given("measure") ? fields.shown_name("measure") : kind_option});
  for (const char* id : {"before", "after"})
    step.preload.push_back({id, fields.text(id).value(), fields.shown_name(id)});
  for (const char* id : kPreloadFields) {
    if (const auto text = fields.text(id))
      step.preload.push_back({id, *text, fields.shown_name(id)});
  }
}

struct AddStepCommand {
  std::string file;
  std::unique_ptr<FieldOptions> fields;
  ReadOptions read;
};

void register_add_step(CLI::App& trial) {
  auto cmd = std::make_shared<AddStepCommand>();
  CLI::App* sub = trial.add_subcommand(
      "add-step", "Append one step to a trial file (earlier text kept as it is)");
  sub->add_option("FILE", cmd->file, "Trial file (made with breathbeat trial new, or by hand)")
      ->required();
  sub->footer(
      "Infusions as calc infusion takes them: --drug with --rate/--concentration/--dose, and\n"
      "any number of --infusion \"DRUG:dose=0.3ug/kg/min\" or \"DRUG:rate=12mL/h,conc=64ug/mL\".\n"
      "A preload test at this step as calc preload-test takes it: --kind with --before and\n"
      "--after (their unit names the measure, or --measure), --volume --duration --fluid --hold.\n"
      "A waveform window: --record FILE (from the current folder; written relative to the trial\n"
      "file) --from T --to T. A PEEP release: --delta-eelv --peep-high --peep-low --pplat-low.\n"
      "A step recorded wrongly is taken out with breathbeat trial void-step.");
  cmd->fields = std::make_unique<FieldOptions>(sub);
  FieldOptions& f = *cmd->fields;
  f.add("label")->required();
  f.add("time");
  f.add("manoeuvre");
  for (const char* table : kStepTables) {
    for (const FieldSpec* spec : fields_of_table(table)) f.add(spec->id);
  }
  add_infusion_options(f);
  add_preload_test_options(f);
  for (const FieldSpec* spec : fields_of_table("waveform")) f.add(spec->id);
  add_read_options(sub, cmd->read);
  sub->callback([cmd] {
    const FieldOptions& fields = *cmd->fields;
    StepRecord step;
    step.label = fields.text("label").value_or("");
    step.time = fields.text("time");
    if (const auto word = fields.choice("manoeuvre"))
      step.values.push_back({"manoeuvre", *word, fields.shown_name("manoeuvre")});
    for (const char* table : kStepTables) {
      for (FieldValue& v : given_values(fields, table)) step.values.push_back(std::move(v));
    }
    step.infusions = infusion_values(fields);
    add_preload_test(fields, step);
    if (fields.given("record")) {
      step.values.push_back(
          {"record", record_in_trial(fields, cmd->file), fields.shown_name("record")});
      for (const char* id : {"from", "to"}) {
        if (const auto t = fields.text(id)) step.values.push_back({id, *t, fields.shown_name(id)});
      }
    } else {
      for (const char* id : {"from", "to"}) {
        if (fields.given(id)) {
          throw InputError(fields.shown_name(id), fields.text(id).value(),
                           "gives a window of no record", fields.shown_name("record") + " FILE");
        }
      }
    }
    const std::string existing = read_text_file(cmd->file);
    std::vector<std::string> notes;
    const std::string updated =
        append_step_text(existing, cmd->file, step, read_options(cmd->read, false), &notes);
    if (fields.given("record")) {
      // The window against the record's length, the check the report makes (waveform_step.hpp).
      const LoadedTrial added = load_trial_text(updated, cmd->file, read_options(cmd->read, false));
      for (const TrialStep& s : added.trial.steps) {
        if (s.label != step.label) continue;
        try {
          check_step_window(added.trial, s);
        } catch (const InputError& e) {
          const char* id = e.field().ends_with("start") ? "from" : "to";
          throw InputError(fields.shown_name(id), e.value(), e.problem(), e.expected());
        }
      }
    }
    print_notes(notes);
    append_to_trial(cmd->file, existing, updated, "step");
    std::cout << "Added step '" << step.label << "' to " << cmd->file << "\n";
  });
}

// ---- trial void-step --------------------------------------------------------------

// Now, as a TOML offset date-time in UTC: 2026-12-03T11:40:12Z.
std::string utc_now() {
  const std::time_t t = std::time(nullptr);
  std::tm utc{};
  gmtime_r(&t, &utc);
  char buf[32];
  std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", &utc);
  return buf;
}

struct VoidStepCommand {
  std::string file;
  std::unique_ptr<FieldOptions> fields;
  ReadOptions read;
};

void register_void_step(CLI::App& trial) {
  auto cmd = std::make_shared<VoidStepCommand>();
  CLI::App* sub = trial.add_subcommand(
      "void-step",
      "Take a step recorded wrongly out of the report: appends a [[voided]] record, time stamped "
      "(the step stays in the file)");
  sub->add_option("FILE", cmd->file, "Trial file")->required();
  cmd->fields = std::make_unique<FieldOptions>(sub);
  cmd->fields->add("label", "Label of the step to void, as the file gives it")->required();
  cmd->fields->add("reason")->required();
  add_read_options(sub, cmd->read);
  sub->callback([cmd] {
    const FieldOptions& fields = *cmd->fields;
    const FieldValue step{"voided_step", fields.text("label").value(), fields.shown_name("label")};
    const FieldValue reason{"reason", fields.text("reason").value(), fields.shown_name("reason")};
    const std::string existing = read_text_file(cmd->file);
    std::vector<std::string> notes;
    const std::string at = utc_now();
    const std::string updated = append_void_text(existing, cmd->file, step, reason, at,
                                                 read_options(cmd->read, false), &notes);
    print_notes(notes);
    append_to_trial(cmd->file, existing, updated, "correction");
    std::cout << "Voided step '" << step.text << "' of " << cmd->file << " at " << at
              << " (the step stays in the file; the report leaves it out and lists it)\n";
  });
}

}  // namespace

void register_trial_commands(CLI::App& app) {
  register_report(app);
  register_check(app);
  CLI::App* trial =
      app.add_subcommand("trial", "Record a trial at the bedside: new, add-step, void-step");
  trial->require_subcommand(1);
  register_new(*trial);
  register_add_step(*trial);
  register_void_step(*trial);
}

}  // namespace bb::cli
