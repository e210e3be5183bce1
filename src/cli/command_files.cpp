#include "command_files.hpp"

#include <fstream>
#include <iostream>
#include <set>

#include "breathbeat/errors.hpp"
#include "breathbeat/fields/registry.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/waveform/wfdb.hpp"

namespace bb::cli {

namespace {

namespace fs = std::filesystem;

// A WFDB record's own files; segments are followed `depth` levels down (a
// multi-segment header names single-segment records).
void add_wfdb_parts(CommandFiles& files, const std::string& option, const fs::path& hea,
                    int depth) {
  wave::WfdbHeader header;
  try {
    header = wave::read_wfdb_header(hea);
  } catch (const std::exception&) {
    return;  // the reader will name what is wrong
  }
  const fs::path dir = hea.parent_path();
  std::set<std::string> seen;
  for (const wave::WfdbSignalSpec& s : header.signals) {
    if (s.file_name.empty() || s.file_name == "~" || s.file_name == "-") continue;
    if (seen.insert(s.file_name).second) files.add_input(option, dir / s.file_name);
  }
  if (depth <= 0) return;
  for (const wave::WfdbSegmentSpec& seg : header.segments) {
    if (seg.record_name.empty() || seg.record_name == "~") continue;
    if (!seen.insert(seg.record_name).second) continue;
    const fs::path segment = dir / (seg.record_name + ".hea");
    files.add_input(option, segment);
    add_wfdb_parts(files, option, segment, depth - 1);
  }
}

}  // namespace

void add_force_flag(CLI::App* app, bool& force, const std::string& help) {
  app->add_flag("--force", force,
                help.empty() ? "Replace an output file that exists already" : help);
}

void add_output_option(CLI::App* app, OutputOption& out, const std::string& help) {
  app->add_option("-o,--output", out.path, help);
  out.old_option = app->add_option("--out", out.old_spelling, "")->group("");
}

void resolve_output_option(OutputOption& out, bool required, const std::string& expected) {
  if (out.old_option && out.old_option->count()) {
    if (!out.path.empty())
      throw InputError("--out", out.old_spelling, "is given with --output " + out.path,
                       "one output file: -o FILE or --output FILE (--out is its old spelling)");
    std::cerr << "breathbeat: " << old_spelling_note("--out", "--output") << "\n";
    out.path = out.old_spelling;
  }
  if (required && out.path.empty())
    throw InputError("--output", "", "is missing", expected + " (-o FILE or --output FILE)");
}

ExistingOutput existing_output(bool force) {
  return force ? ExistingOutput::replace : ExistingOutput::refuse;
}

void add_record_inputs(CommandFiles& files, const std::string& option, const fs::path& record) {
  files.add_input(option, record);
  if (ascii_lower(record.extension().string()) == ".hea") add_wfdb_parts(files, option, record, 1);
}

void add_trial_record_inputs(CommandFiles& files, const Trial& trial) {
  for (const TrialStep& step : trial.steps) {
    if (!step.waveform) continue;
    fs::path p(step.waveform->file);
    if (!p.is_absolute() && !trial.file.empty()) p = fs::path(trial.file).parent_path() / p;
    add_record_inputs(files, "the record of step '" + step.label + "'", p);
  }
}

bool looks_like_trial_file(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::string line;
  // A trial file is small; its [patient] table comes first or near it.
  for (int n = 0; n < 10000 && std::getline(in, line); ++n) {
    if (trim_view(line) == "[patient]") return true;
  }
  return false;
}

}  // namespace bb::cli
