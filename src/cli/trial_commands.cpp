// breathbeat report, check, trial new, trial add-step: parse options, call the
// trial library, print or write. No physiology here.
#include <iostream>

#include "breathbeat/report.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "breathbeat/trial/trial_file.hpp"
#include "breathbeat/trial/waveform_step.hpp"
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

// ---- report ---------------------------------------------------------------------

struct ReportCommand {
  std::string file;
  std::string format = "text";
  std::string out;
  std::string reference;
  ReadOptions read;
};

void register_report(CLI::App& app) {
  auto cmd = std::make_shared<ReportCommand>();
  CLI::App* sub = app.add_subcommand("report", "The per-setting heart-lung report of a trial file");
  sub->add_option("FILE", cmd->file, "Trial file (TOML; docs/trial-file.md)")->required();
  sub->add_option("--format", cmd->format, "text (default), json or csv");
  sub->add_option("-o,--output", cmd->out,
                  "Write the report to this file (atomically) instead of stdout");
  sub->add_option("--reference", cmd->reference,
                  "Label of the reference step (default: the first step)");
  add_read_options(sub, cmd->read);
  sub->callback([cmd] {
    const ReportFormat format = parse_report_format(cmd->format);
    LoadedTrial loaded = load_trial_file(cmd->file, read_options(cmd->read));
    apply_step_waveforms(loaded.trial, loaded.limits);
    std::optional<std::string> reference;
    if (!cmd->reference.empty()) reference = cmd->reference;
    const TrialAnalysis analysis = analyse_trial(loaded.trial, loaded.limits, reference);
    const std::string text = render_report(analysis, format);
    if (cmd->out.empty()) {
      std::cout << text << std::flush;
      return;
    }
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
    const LoadedTrial loaded = load_trial_file(cmd->file, read_options(cmd->read));
    const std::size_t n = loaded.trial.steps.size();
    std::cout << "OK: " << cmd->file << ": " << n << " step" << (n == 1 ? "" : "s")
              << ", no problems found.\n";
  });
}

// ---- trial new ------------------------------------------------------------------

struct NewCommand {
  std::string file;
  NewTrialValues values;
  std::string weight, age, label;
  ReadOptions read;
};

void register_new(CLI::App& trial) {
  auto cmd = std::make_shared<NewCommand>();
  CLI::App* sub = trial.add_subcommand("new", "Start a new trial file (refuses to overwrite one)");
  sub->add_option("FILE", cmd->file, "Trial file to create")->required();
  sub->add_option("--sex", cmd->values.sex, "male or female (for predicted body weight)")
      ->required();
  sub->add_option("--height", cmd->values.height, "Height [default unit cm]")->required();
  sub->add_option("--weight", cmd->weight, "Weight [default unit kg]");
  sub->add_option("--age", cmd->age, "Age in years");
  sub->add_option("--label", cmd->label, "A pseudonymous label (never a real name is needed)");
  add_read_options(sub, cmd->read);
  sub->callback([cmd] {
    if (std::filesystem::exists(cmd->file)) {
      throw InputError("FILE", cmd->file, "already exists",
                       "a new file name; trial new never overwrites");
    }
    NewTrialValues v = cmd->values;
    if (!cmd->weight.empty()) v.weight = cmd->weight;
    if (!cmd->age.empty()) v.age = cmd->age;
    if (!cmd->label.empty()) v.label = cmd->label;
    const std::string text = new_trial_text(v, read_options(cmd->read, false));
    if (std::filesystem::exists(cmd->file)) {
      throw InputError("FILE", cmd->file, "already exists",
                       "a new file name; trial new never overwrites");
    }
    write_file_atomically(cmd->file, text);
    std::cout << "Created " << cmd->file
              << " (no steps yet; add them with breathbeat trial add-step)\n";
  });
}

// ---- trial add-step ---------------------------------------------------------------

// One option of add-step and where its value goes in the file.
struct StepOption {
  const char* field;  // option name with underscores (--set-peep is set_peep)
  const char* table;
  const char* key;
  const char* help;
};

constexpr StepOption kStepOptions[] = {
    {"mode", "ventilator", "mode", "vc or pc"},
    {"set_peep", "ventilator", "set_peep", "PEEP set on the ventilator [cmH2O]"},
    {"vt", "ventilator", "vt", "Tidal volume [mL]"},
    {"pinsp", "ventilator", "pinsp", "PC: total inspiratory pressure above atmosphere [cmH2O]"},
    {"rr", "ventilator", "rr", "Respiratory rate [/min]"},
    {"ti", "ventilator", "ti", "Inspiratory time [s]"},
    {"ie", "ventilator", "ie", "I:E ratio, e.g. 1:2"},
    {"fio2", "ventilator", "fio2", "FiO2 [% or fraction]"},
    {"flow", "ventilator", "flow", "Constant inspiratory flow [L/min]"},
    {"peep", "hold", "peep_total", "Total PEEP, end-expiratory hold [cmH2O]"},
    {"pplat", "hold", "pplat", "Plateau pressure [cmH2O]"},
    {"ppeak", "hold", "ppeak", "Peak pressure [cmH2O]"},
    {"pes_ee", "hold", "pes_ee", "Oesophageal pressure, end-expiration [cmH2O]"},
    {"pes_ei", "hold", "pes_ei", "Oesophageal pressure, end-inspiration [cmH2O]"},
    {"pao2", "gases", "pao2", "PaO2 [mmHg]"},
    {"paco2", "gases", "paco2", "PaCO2 [mmHg]"},
    {"sao2", "gases", "sao2", "SaO2 [%]"},
    {"spo2", "gases", "spo2", "SpO2 [%]"},
    {"svo2", "gases", "svo2", "SvO2, mixed venous [%]"},
    {"scvo2", "gases", "scvo2", "ScvO2, central venous [%]"},
    {"pvo2", "gases", "pvo2", "PvO2 [mmHg]"},
    {"hb", "gases", "hb", "Haemoglobin [g/dL]"},
    {"lactate", "gases", "lactate", "Lactate [mmol/L]"},
    {"hr", "circulation", "hr", "Heart rate [/min]"},
    {"sbp", "circulation", "sbp", "Systolic pressure [mmHg]"},
    {"dbp", "circulation", "dbp", "Diastolic pressure [mmHg]"},
    {"map", "circulation", "map", "Mean arterial pressure [mmHg]"},
    {"cvp", "circulation", "cvp", "Central venous pressure [mmHg]"},
    {"pmsf", "circulation", "pmsf", "Mean systemic filling pressure [mmHg]"},
    {"co", "circulation", "co", "Cardiac output [L/min]"},
    {"co_method", "circulation", "co_method", "How CO was measured (free text)"},
    {"cycles", "circulation", "pp_cycles", "PPmax/PPmin per breath, e.g. 62/48,60/47,63/50 [mmHg]"},
    {"ppv", "circulation", "ppv", "PPV shown by a monitor [%]"},
    {"svv", "circulation", "svv", "SVV [%]"},
    {"dmax", "ultrasound", "ivc_dmax", "IVC widest diameter [cm]"},
    {"dmin", "ultrasound", "ivc_dmin", "IVC narrowest diameter [cm]"},
    {"breathing", "ultrasound", "ivc_breathing",
     "passive or spontaneous, while the IVC was imaged"},
    {"lvot", "ultrasound", "lvot_diameter", "LVOT diameter [cm]"},
    {"vti", "ultrasound", "vti", "LVOT velocity-time integral [cm]"},
};

// yes/no statements, written as TOML booleans.
struct StepFlag {
  const char* yes;
  const char* no;
  const char* table;
  const char* key;
  const char* help;
};
constexpr StepFlag kStepFlags[] = {
    {"--spontaneous", "--passive", "circulation", "spontaneous_effort",
     "spontaneous effort seen / fully passive"},
    {"--irregular", "--regular", "circulation", "rhythm_regular", "rhythm irregular / regular"},
    {"--chest-open", "--chest-closed", "circulation", "chest_open", "chest open / closed"},
    {"--iah", "--no-iah", "circulation", "intra_abdominal_hypertension",
     "intra-abdominal hypertension present / absent"},
    {"--rv-failure", "--no-rv-failure", "circulation", "rv_failure",
     "right-ventricular failure present / absent"},
};

struct AddStepCommand {
  std::string file;
  std::string label;
  std::string time;
  std::map<std::string, std::string> texts;
  std::map<std::string, CLI::Option*> options;
  std::map<std::string, std::pair<bool, bool>> flags;  // key -> (yes, no)
  ReadOptions read;
};

std::string dashed(const char* field) {
  std::string s = std::string("--") + field;
  for (auto& c : s) {
    if (c == '_') c = '-';
  }
  return s;
}

std::vector<StepValue> step_values(const AddStepCommand& c) {
  std::vector<StepValue> values;
  for (const StepOption& o : kStepOptions) {
    if (!c.options.at(o.field)->count()) continue;
    values.push_back(StepValue{o.table, o.key, c.texts.at(o.field), dashed(o.field), false});
  }
  for (const StepFlag& f : kStepFlags) {
    const auto [yes, no] = c.flags.at(f.key);
    if (yes && no) {
      throw InputError(std::string(f.yes) + "/" + f.no, "both", "were both given", "one of them");
    }
    if (!yes && !no) continue;
    const bool value = f.key == std::string("rhythm_regular") ? no : yes;
    values.push_back(StepValue{f.table, f.key, value ? "true" : "false", yes ? f.yes : f.no, true});
  }
  return values;
}

void register_add_step(CLI::App& trial) {
  auto cmd = std::make_shared<AddStepCommand>();
  CLI::App* sub = trial.add_subcommand(
      "add-step", "Append one step to a trial file (earlier text kept as it is)");
  sub->add_option("FILE", cmd->file, "Trial file (made with breathbeat trial new, or by hand)")
      ->required();
  sub->add_option("--label", cmd->label, "Label of the step, unique in the trial, e.g. \"PEEP 10\"")
      ->required();
  sub->add_option("--time", cmd->time, "Time of the step (free text, e.g. 14:05)");
  for (const StepOption& o : kStepOptions) {
    cmd->texts[o.field] = "";
    cmd->options[o.field] = sub->add_option(dashed(o.field), cmd->texts[o.field], o.help);
  }
  for (const StepFlag& f : kStepFlags) {
    auto& pair = cmd->flags[f.key];
    sub->add_flag(f.yes, pair.first, f.help);
    sub->add_flag(f.no, pair.second, f.help);
  }
  add_read_options(sub, cmd->read);
  sub->callback([cmd] {
    const std::string existing = read_text_file(cmd->file);
    std::optional<std::string> time;
    if (!cmd->time.empty()) time = cmd->time;
    const std::string updated = append_step_text(existing, cmd->file, cmd->label, time,
                                                 step_values(*cmd), read_options(cmd->read, false));
    if (read_text_file(cmd->file) != existing) {
      throw InputError("FILE", cmd->file, "changed while the step was being added",
                       "to run add-step again");
    }
    write_file_atomically(cmd->file, updated);
    std::cout << "Added step '" << cmd->label << "' to " << cmd->file << "\n";
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
