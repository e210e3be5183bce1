// breathbeat report, check, trial new, trial add-step: parse options, call the
// trial library, print or write. No physiology here.
#include <iostream>
#include <memory>

#include "breathbeat/io/atomic_file.hpp"
#include "breathbeat/present/report.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "breathbeat/trial/trial_file.hpp"
#include "breathbeat/trial/waveform_step.hpp"
#include "cli_common.hpp"
#include "command_files.hpp"
#include "commands.hpp"

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
  std::string file;
  std::string format = "text";
  std::string out;
  std::string reference;
  bool force = false;
  ReadOptions read;
};

void register_report(CLI::App& app) {
  auto cmd = std::make_shared<ReportCommand>();
  CLI::App* sub = app.add_subcommand("report", "The per-setting heart-lung report of a trial file");
  sub->add_option("FILE", cmd->file, "Trial file (TOML; docs/trial-file.md)")->required();
  sub->add_option("--format", cmd->format, "text (default), json, csv or html");
  sub->add_option("-o,--output", cmd->out,
                  "Write the report to this file (atomically) instead of stdout");
  sub->add_option("--reference", cmd->reference,
                  "Label of the reference step (default: the first step)");
  add_force_flag(sub, cmd->force, "Replace an existing --output file (never a trial file)");
  add_read_options(sub, cmd->read);
  sub->callback([cmd] {
    const ReportFormat format = parse_report_format(ascii_lower(cmd->format));
    LoadedTrial loaded = load_trial(cmd->file, read_options(cmd->read));
    apply_step_waveforms(loaded.trial, loaded.limits);
    const TrialAnalysis analysis = analyse_with_reference(loaded, cmd->reference);
    const std::string text = render_report(analysis, format);
    if (cmd->out.empty()) {
      std::cout << text << std::flush;
      return;
    }
    // The output is never the trial, a record it names or the thresholds file,
    // and never replaces another trial file.
    CommandFiles files;
    files.add_input("FILE", cmd->file);
    if (!cmd->read.thresholds_file.empty())
      files.add_input("--thresholds", cmd->read.thresholds_file);
    add_trial_record_inputs(files, loaded.trial);
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
    const std::size_t n = loaded.trial.steps.size();
    std::cout << "OK: " << cmd->file << ": " << n << " step" << (n == 1 ? "" : "s")
              << ", no problems found.\n";
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
  // Before the registry, `trial new` named the patient's label --label.
  const FieldSpec* patient_label = &field_spec("patient_label");
  cmd->old_label_option = sub->add_option("--label", cmd->old_label, "")->group("");
  cmd->old_label_option->excludes(option_name(*patient_label));
  add_read_options(sub, cmd->read);
  sub->callback([cmd, patient_label] {
    if (std::filesystem::exists(cmd->file)) {
      throw InputError("FILE", cmd->file, "already exists",
                       "a new file name; trial new never overwrites");
    }
    std::vector<FieldValue> values = given_values(*cmd->fields, "patient");
    if (cmd->old_label_option->count()) {
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

// The tables of a step that add-step writes; every field of them is an option.
constexpr const char* kStepTables[] = {"ventilator",  "hold",       "gases",
                                       "circulation", "ultrasound", "challenge"};

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
  cmd->fields = std::make_unique<FieldOptions>(sub);
  cmd->fields->add("label")->required();
  cmd->fields->add("time");
  cmd->fields->add("manoeuvre");
  for (const char* table : kStepTables) {
    for (const FieldSpec* f : fields_of_table(table)) cmd->fields->add(f->id);
  }
  add_read_options(sub, cmd->read);
  sub->callback([cmd] {
    const FieldOptions& fields = *cmd->fields;
    std::vector<FieldValue> values;
    if (const auto word = fields.choice("manoeuvre"))
      values.push_back({"manoeuvre", *word, fields.shown_name("manoeuvre")});
    for (const char* table : kStepTables) {
      for (FieldValue& v : given_values(fields, table)) values.push_back(std::move(v));
    }
    const std::string existing = read_text_file(cmd->file);
    const std::string label = fields.text("label").value_or("");
    const std::optional<std::string> time = fields.text("time");
    std::vector<std::string> notes;
    const std::string updated = append_step_text(existing, cmd->file, label, time, values,
                                                 read_options(cmd->read, false), &notes);
    print_notes(notes);
    if (read_text_file(cmd->file) != existing) {
      throw InputError("FILE", cmd->file, "changed while the step was being added",
                       "to run add-step again");
    }
    // The trial file is this command's input and output by design: only ever
    // appended to, never rewritten.
    if (updated.compare(0, existing.size(), existing) != 0)
      throw std::logic_error("add-step would change the earlier text of " + cmd->file);
    write_file_atomically(cmd->file, updated);
    std::cout << "Added step '" << label << "' to " << cmd->file << "\n";
  });
}

}  // namespace

void register_trial_commands(CLI::App& app) {
  register_report(app);
  register_check(app);
  CLI::App* trial = app.add_subcommand("trial", "Record a trial at the bedside: new, add-step");
  trial->require_subcommand(1);
  register_new(*trial);
  register_add_step(*trial);
}

}  // namespace bb::cli
